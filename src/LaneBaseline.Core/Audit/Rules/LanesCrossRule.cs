using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I01</c> lanes cross: two lanes change left-to-right order below the horizon. Sampled every 2 rows over their
/// common rows below the horizon; a crossing is reported when each lane lies more than the order tolerance on either
/// side of the other. Pixel coordinates: x right, y down.
/// </summary>
public sealed class LanesCrossRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.LanesCross, "lanes-cross", AuditSeverity.Error, "x-order of two lanes flips by more than 2 px on both sides, below the horizon",
        "parallel ground curves project to non-crossing image curves below the horizon (pinhole projection; Hartley & Zisserman, 2nd ed.); 2 px label noise: common practice");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = frame.Lanes;
        double tol = frame.Settings.OrderTolerancePx;
        double roadTop = frame.Horizon ?? double.NegativeInfinity;
        for (int i = 0; i < lanes.Count; i++)
        {
            for (int j = i + 1; j < lanes.Count; j++)
            {
                (double lo, double hi) = LaneSampling.Common(lanes[i], lanes[j], roadTop);
                double pos = 0, neg = 0, atRow = double.NaN, previous = double.NaN;
                for (double y = Math.Floor(hi); y >= lo; y -= 2)
                {
                    if (LaneSampling.XAt(lanes[i], y, out double xi) && LaneSampling.XAt(lanes[j], y, out double xj))
                    {
                        double d = xi - xj;

                        // The crossing row: the first sampled row within the tolerance, else the first where the
                        // order flips between two sampled rows (steep lanes can jump past the tolerance band).
                        if (double.IsNaN(atRow) && previous * d < 0)
                        {
                            atRow = y;
                        }

                        previous = d;
                        if (d > pos)
                        {
                            pos = d;
                        }

                        if (-d > neg)
                        {
                            neg = -d;
                        }

                        if (Math.Abs(d) <= tol && double.IsNaN(atRow))
                        {
                            atRow = y;
                        }
                    }
                }

                double depth = Math.Min(pos, neg);
                if (depth > tol)
                {
                    sink.Add(frame.Finding(this, i, j, depth, tol, "px", Inv($"lanes {i} and {j} cross near row {atRow:0} (each side by up to {depth:0.#} px)")));
                }
            }
        }
    }
}
