using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I03</c> above the horizon: a lane reaches more than a margin above the horizon row (<c>--horizon-row</c>, the
/// camera's, else the lanes' vanishing row; no finding when none is known).
/// </summary>
public sealed class AboveHorizonRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.AboveHorizon, "above-horizon", AuditSeverity.Error, "a point more than 3 % of the frame height above the horizon row (--horizon-row, else the lanes' vanishing point)",
        "the ground plane images entirely below the horizon (docs/checks.md camera rows: horizon v = 325.08 at 2° pitch); 3 % fit allowance: common practice");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        if (frame.Horizon is not double hz)
        {
            return;
        }

        IReadOnlyList<Lane> lanes = frame.Lanes;
        double margin = frame.Settings.HorizonMarginFraction * frame.Height;
        for (int i = 0; i < lanes.Count; i++)
        {
            double above = hz - LaneSampling.Extent(lanes[i]).Min;
            if (above > margin)
            {
                string how = frame.Settings.HorizonRow is null ? "estimated vanishing row" : "horizon row";
                sink.Add(frame.Finding(this, i, null, above, margin, "px", Inv($"lane {i} reaches {above:0.#} px above the {how} {hz:0.#}")));
            }
        }
    }
}
