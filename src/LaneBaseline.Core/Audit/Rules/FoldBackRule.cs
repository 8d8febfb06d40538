using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I02</c> fold-back: a lane's rows go back down after going up along its near-to-far points (x(y) is not a
/// function of y). Tolerance: the order tolerance, at least 1 % of the frame height for dense noisy labels.
/// </summary>
public sealed class FoldBackRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.FoldBack, "fold-back", AuditSeverity.Error, "y rises again by more than max(2 px, 1 % of the frame height) along the near-to-far point order",
        "lane-file spec: points near to far, y decreasing; a ground curve ahead of the camera is monotone in image row (common practice)");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = frame.Lanes;
        double foldTol = Math.Max(frame.Settings.OrderTolerancePx, 0.01 * frame.Height);
        for (int i = 0; i < lanes.Count; i++)
        {
            double minY = double.PositiveInfinity, worst = 0;
            foreach (LanePoint p in lanes[i].Points)
            {
                minY = Math.Min(minY, p.Y);
                worst = Math.Max(worst, p.Y - minY);
            }

            if (worst > foldTol)
            {
                sink.Add(frame.Finding(this, i, null, worst, foldTol, "px", Inv($"lane {i} turns back down by {worst:0.#} px after rising (points must run near to far)")));
            }
        }
    }
}
