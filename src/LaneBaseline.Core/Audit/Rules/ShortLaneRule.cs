using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I04</c> short lane: a polyline shorter than max(20 px, a fraction of the frame height). Arc length, not rows:
/// a lane at the image edge may span few rows yet be long.
/// </summary>
public sealed class ShortLaneRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.ShortLane, "short-lane", AuditSeverity.Warning, "polyline length under max(20 px, 5 % of the frame height)",
        "common practice: a fragment that short is clutter, not a marking boundary (docs/metrics.md samples rows every 10 px)");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = frame.Lanes;
        double minLength = Math.Max(20, frame.Settings.ShortLaneFraction * frame.Height);
        for (int i = 0; i < lanes.Count; i++)
        {
            double length = Geometry.Polylines.Length(lanes[i].Points);
            if (length < minLength)
            {
                sink.Add(frame.Finding(this, i, null, length, minLength, "px", Inv($"lane {i} is {length:0.#} px long")));
            }
        }
    }
}
