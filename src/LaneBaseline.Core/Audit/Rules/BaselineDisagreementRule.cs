using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-B01</c> baseline disagreement: F1 at IoU 0.50 of the predictions against the baseline's confident lanes
/// (<see cref="AuditFrame.Baseline"/>, computed by <see cref="AuditRun"/> with the score's rasteriser) is under
/// <see cref="AuditSettings.MinAgreementF1"/>. Frames where the baseline has no confident lane are not compared.
/// </summary>
public sealed class BaselineDisagreementRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.BaselineDisagreement, "baseline-disagreement", AuditSeverity.Warning, "F1 at IoU 0.50 against the baseline's confident lanes (score >= 0.5) under 0.5",
        "rasterised-IoU F1 (docs/metrics.md; common practice in the lane-detection literature) with the baseline as reference");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Baseline;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        if (frame.Baseline is not { } agreement || !(agreement.F1 < frame.Settings.MinAgreementF1))
        {
            return;
        }

        sink.Add(frame.Finding(this, null, null, agreement.F1, frame.Settings.MinAgreementF1, "F1",
            Inv($"F1@0.50 {agreement.F1:0.###} against {agreement.ConfidentLanes} confident baseline lane(s) ({agreement.Matched} matched of {frame.Lanes.Count} predicted)")));
    }
}
