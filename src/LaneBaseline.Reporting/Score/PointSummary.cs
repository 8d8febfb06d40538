namespace LaneBaseline.Reporting.Score;

/// <summary>Row-sampled point accuracy of a tally.</summary>
/// <param name="TolerancePx">Base tolerance in pixels, or null for frames of mixed sizes.</param>
/// <param name="Accuracy">Accuracy (0–1).</param>
/// <param name="FpRate">Unmatched predictions / predictions.</param>
/// <param name="FnRate">Unmatched truths / truths.</param>
/// <param name="Matched">Matched truth lanes.</param>
public sealed record PointSummary(double? TolerancePx, double Accuracy, double FpRate, double FnRate, long Matched);
