using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I06</c> slot order: two lanes claim one slot, or their slots contradict their left-to-right order by more than
/// the order tolerance at the nearest common row below the horizon.
/// </summary>
public sealed class SlotOrderRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.SlotOrder, "slot-order", AuditSeverity.Error, "slot order contradicts x order by more than 2 px at the nearest common row, or a slot repeats",
        "lane-file spec: slot -1 left ego boundary, +1 right, ±2 next out");

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
                if (lanes[i].Slot is not int si || lanes[j].Slot is not int sj)
                {
                    continue;
                }

                if (si == sj)
                {
                    sink.Add(frame.Finding(this, j, i, sj, 0, "slot", Inv($"lanes {i} and {j} both claim slot {sj}")));
                    continue;
                }

                (double lo, double hi) = LaneSampling.Common(lanes[i], lanes[j], roadTop);
                double row = Math.Floor(hi);
                if (row < lo || !LaneSampling.XAt(lanes[i], row, out double xi) || !LaneSampling.XAt(lanes[j], row, out double xj))
                {
                    continue;
                }

                (int left, int right, double xl, double xr) = si < sj ? (i, j, xi, xj) : (j, i, xj, xi);
                if (xl - xr > tol)
                {
                    sink.Add(frame.Finding(this, left, right, xl - xr, tol, "px", Inv($"lane {left} (slot {lanes[left].Slot}) lies {xl - xr:0.#} px right of lane {right} (slot {lanes[right].Slot}) at row {row:0}")));
                }
            }
        }
    }
}
