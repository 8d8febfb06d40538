namespace LaneBaseline.Reporting.Score;

/// <summary>One IoU threshold row: its key as written (<c>"0.50"</c>), its numeric value and its counts.</summary>
/// <param name="Key">Threshold key as written in the score file.</param>
/// <param name="Value">The threshold as a number.</param>
/// <param name="Counts">Counts at the threshold.</param>
public sealed record ThresholdRow(string Key, double Value, DetectionSummary Counts);
