namespace LaneBaseline.Core.Audit;

/// <summary>A frame's agreement with the baseline's confident lanes (rasterised-IoU F1 at 0.50, docs/metrics.md).</summary>
/// <param name="F1">F1 at IoU 0.50 with the confident baseline lanes as reference.</param>
/// <param name="ConfidentLanes">Baseline lanes with a score at or above <see cref="AuditSettings.BaselineMinScore"/> (or none).</param>
/// <param name="Matched">Predicted lanes matched to them.</param>
public sealed record BaselineAgreement(double F1, int ConfidentLanes, int Matched);
