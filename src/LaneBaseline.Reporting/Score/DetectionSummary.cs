namespace LaneBaseline.Reporting.Score;

/// <summary>Detection counts and rates at one IoU threshold (or one confidence cutoff).</summary>
/// <param name="Tp">True positives.</param>
/// <param name="Fp">False positives.</param>
/// <param name="Fn">False negatives.</param>
/// <param name="Precision">TP / (TP + FP); NaN when the file held null.</param>
/// <param name="Recall">TP / (TP + FN); NaN when the file held null.</param>
/// <param name="F1">Harmonic mean of precision and recall; NaN when the file held null.</param>
public sealed record DetectionSummary(long Tp, long Fp, long Fn, double Precision, double Recall, double F1);
