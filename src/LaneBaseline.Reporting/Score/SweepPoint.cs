namespace LaneBaseline.Reporting.Score;

/// <summary>One point of the precision–recall sweep over lane confidence (IoU 0.50).</summary>
/// <param name="MinScore">Lanes with confidence below this were dropped.</param>
/// <param name="Counts">Counts at the cutoff.</param>
public sealed record SweepPoint(double MinScore, DetectionSummary Counts);
