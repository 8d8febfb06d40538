using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-T02</c> flicker: over three consecutive frames of a sequence, a lane missing in the middle one but present
/// before and after, or present in the middle one only (matched within half a lane width, <see cref="LaneMatching"/>).
/// The findings belong to the middle frame, so they are made when the frame after it is checked.
/// </summary>
public sealed class FlickerRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.Flicker, "flicker", AuditSeverity.Warning, "a lane missing in one frame but present in the frames before and after (or the reverse), matched within half a lane width",
        "lane markings persist over 1/fps s at road speeds (common practice)");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Temporal;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        if (frame.Older is not { } a || frame.Previous is not { } b)
        {
            return;
        }

        AuditFrame c = frame;
        var ab = LaneMatching.Match(a.Lanes, b.Lanes, 0.5);
        var bc = LaneMatching.Match(b.Lanes, c.Lanes, 0.5);
        foreach ((int i, int k, _, double row) in LaneMatching.Match(a.Lanes, c.Lanes, 0.5))
        {
            if (!ab.Any(m => m.I == i) && !bc.Any(m => m.J == k))
            {
                sink.Add(b.Finding(this, null, null, 1, 0, "frames",
                    Inv($"lane {i} of '{a.Record.Frame}' (slot {Slot(a.Lanes[i])}) is missing here but back in '{c.Record.Frame}' (lane {k})")));
            }
        }

        for (int j = 0; j < b.Lanes.Count; j++)
        {
            if (!ab.Any(m => m.J == j) && !bc.Any(m => m.I == j) && a.Lanes.Count > 0 && c.Lanes.Count > 0)
            {
                sink.Add(b.Finding(this, j, null, 1, 0, "frames",
                    Inv($"lane {j} appears in this frame only (not in '{a.Record.Frame}' nor '{c.Record.Frame}')")));
            }
        }
    }

    private static string Slot(Lane lane) => lane.Slot?.ToString(CultureInfo.InvariantCulture) ?? "none";
}
