namespace LaneBaseline.Reporting.Score;

/// <summary>One bin of the reliability table.</summary>
/// <param name="Low">Lower score edge.</param>
/// <param name="High">Upper score edge.</param>
/// <param name="Lanes">Scored lanes in the bin.</param>
/// <param name="MeanScore">Their mean score (NaN when empty).</param>
/// <param name="Precision">Share of them that are true positives at IoU 0.50 (NaN when empty).</param>
public sealed record ReliabilityBin(double Low, double High, long Lanes, double MeanScore, double Precision);
