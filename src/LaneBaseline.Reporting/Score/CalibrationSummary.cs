namespace LaneBaseline.Reporting.Score;

/// <summary>The <c>calibration</c> block of a system: ECE (Naeini et al. 2015), reliability bins, best-F1 threshold.</summary>
/// <param name="ScoredLanes">Lanes that carry a score.</param>
/// <param name="Ece">Expected calibration error.</param>
/// <param name="Bins">Reliability bins in score order.</param>
/// <param name="BestThreshold">Score threshold with the best F1 (NaN when absent).</param>
/// <param name="BestF1">That F1 (NaN when absent).</param>
public sealed record CalibrationSummary(long ScoredLanes, double Ece, IReadOnlyList<ReliabilityBin> Bins, double BestThreshold, double BestF1);
