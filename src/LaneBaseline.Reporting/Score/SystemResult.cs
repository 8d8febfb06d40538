namespace LaneBaseline.Reporting.Score;

/// <summary>Everything the score file says about one system.</summary>
/// <param name="Name">System name.</param>
/// <param name="Overall">All frames.</param>
/// <param name="Intervals">Bootstrap intervals, or null when the run had none.</param>
/// <param name="ConfidenceSweep">Precision–recall sweep, empty when the lanes carry no confidence.</param>
/// <param name="ByTag">Per-tag tallies in ordinal key order.</param>
public sealed record SystemResult(
    string Name,
    Tally Overall,
    IntervalSet? Intervals,
    IReadOnlyList<SweepPoint> ConfidenceSweep,
    IReadOnlyList<KeyValuePair<string, Tally>> ByTag)
{
    /// <summary>Confidence calibration of the system's scored lanes, or null when its lanes carry no score.</summary>
    public CalibrationSummary? Calibration { get; init; }

    /// <summary>Per-tag bootstrap intervals by statistic key (<c>by_tag.TAG.intervals</c>), empty when the run had no bootstrap.</summary>
    public IReadOnlyDictionary<string, IReadOnlyDictionary<string, Ci>> TagIntervals { get; init; } = new Dictionary<string, IReadOnlyDictionary<string, Ci>>(StringComparer.Ordinal);

    /// <summary>Which truth frames the prediction file covered (missing and extra records), or null when not recorded.</summary>
    public LaneBaseline.Core.Metrics.Coverage.FrameCoverage? Coverage { get; init; }
}
