namespace LaneBaseline.Reporting.Score;

/// <summary>Detection counts and rates at one IoU threshold (or one confidence cutoff).</summary>
/// <param name="Tp">True positives.</param>
/// <param name="Fp">False positives.</param>
/// <param name="Fn">False negatives.</param>
/// <param name="Precision">TP / (TP + FP); NaN when the file held null.</param>
/// <param name="Recall">TP / (TP + FN); NaN when the file held null.</param>
/// <param name="F1">Harmonic mean of precision and recall; NaN when the file held null.</param>
public sealed record DetectionSummary(long Tp, long Fp, long Fn, double Precision, double Recall, double F1);

/// <summary>One IoU threshold row: its key as written (<c>"0.50"</c>), its numeric value and its counts.</summary>
/// <param name="Key">Threshold key as written in the score file.</param>
/// <param name="Value">The threshold as a number.</param>
/// <param name="Counts">Counts at the threshold.</param>
public sealed record ThresholdRow(string Key, double Value, DetectionSummary Counts);

/// <summary>Row-sampled point accuracy of a tally.</summary>
/// <param name="TolerancePx">Base tolerance in pixels, or null for frames of mixed sizes.</param>
/// <param name="Accuracy">Accuracy (0–1).</param>
/// <param name="FpRate">Unmatched predictions / predictions.</param>
/// <param name="FnRate">Unmatched truths / truths.</param>
/// <param name="Matched">Matched truth lanes.</param>
public sealed record PointSummary(double? TolerancePx, double Accuracy, double FpRate, double FnRate, long Matched);

/// <summary>The metrics of a set of frames (a whole system or one tag).</summary>
/// <param name="Frames">Frames in the set.</param>
/// <param name="TruthLanes">Truth lanes.</param>
/// <param name="PredLanes">Predicted lanes.</param>
/// <param name="WidthPx">Rasterised lane width in pixels, or null for mixed sizes.</param>
/// <param name="Thresholds">Rows ascending by threshold.</param>
/// <param name="MeanF1">mF1 over 0.50:0.05:0.95.</param>
/// <param name="Point">Point accuracy.</param>
public sealed record Tally(
    long Frames,
    long TruthLanes,
    long PredLanes,
    int? WidthPx,
    IReadOnlyList<ThresholdRow> Thresholds,
    double MeanF1,
    PointSummary Point)
{
    /// <summary>Road-plane errors (metres), or null when the run had no camera.</summary>
    public GroundSummary? Ground { get; init; }

    /// <summary>The counts at a threshold key, or null when the file does not hold it.</summary>
    public DetectionSummary? At(string key) => Thresholds.FirstOrDefault(t => t.Key == key)?.Counts;
}

/// <summary>A confidence interval.</summary>
/// <param name="Low">Lower bound.</param>
/// <param name="High">Upper bound.</param>
public readonly record struct Ci(double Low, double High);

/// <summary>The bootstrap intervals of one system.</summary>
/// <param name="Method">How they were computed, as written in the file.</param>
/// <param name="Level">Confidence level (0.95).</param>
/// <param name="Resamples">Bootstrap resamples.</param>
/// <param name="Seed">Seed of the resampling.</param>
/// <param name="ByStatistic">Interval per statistic key (<c>f1@0.50</c>, <c>precision@0.50</c>, <c>recall@0.50</c>, <c>accuracy</c>).</param>
public sealed record IntervalSet(string Method, double Level, long Resamples, ulong Seed, IReadOnlyDictionary<string, Ci> ByStatistic)
{
    /// <summary>The interval of a statistic, or null.</summary>
    public Ci? Get(string key) => ByStatistic.TryGetValue(key, out Ci ci) ? ci : null;
}

/// <summary>One point of the precision–recall sweep over lane confidence (IoU 0.50).</summary>
/// <param name="MinScore">Lanes with confidence below this were dropped.</param>
/// <param name="Counts">Counts at the cutoff.</param>
public sealed record SweepPoint(double MinScore, DetectionSummary Counts);

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

/// <summary>One bin of the reliability table.</summary>
/// <param name="Low">Lower score edge.</param>
/// <param name="High">Upper score edge.</param>
/// <param name="Lanes">Scored lanes in the bin.</param>
/// <param name="MeanScore">Their mean score (NaN when empty).</param>
/// <param name="Precision">Share of them that are true positives at IoU 0.50 (NaN when empty).</param>
public sealed record ReliabilityBin(double Low, double High, long Lanes, double MeanScore, double Precision);

/// <summary>The <c>calibration</c> block of a system: ECE (Naeini et al. 2015), reliability bins, best-F1 threshold.</summary>
/// <param name="ScoredLanes">Lanes that carry a score.</param>
/// <param name="Ece">Expected calibration error.</param>
/// <param name="Bins">Reliability bins in score order.</param>
/// <param name="BestThreshold">Score threshold with the best F1 (NaN when absent).</param>
/// <param name="BestF1">That F1 (NaN when absent).</param>
public sealed record CalibrationSummary(long ScoredLanes, double Ece, IReadOnlyList<ReliabilityBin> Bins, double BestThreshold, double BestF1);

/// <summary>A paired difference statistic(a) − statistic(b).</summary>
/// <param name="Key">Statistic key.</param>
/// <param name="Diff">Full-sample difference.</param>
/// <param name="Ci95">Joint-bootstrap interval of the difference, or null.</param>
public sealed record PairedStatistic(string Key, double Diff, Ci? Ci95);

/// <summary>The paired comparison of two systems on the same frames.</summary>
/// <param name="Key">Key as written (<c>"A - B"</c>).</param>
/// <param name="A">First system.</param>
/// <param name="B">Second system.</param>
/// <param name="Statistics">Statistics in file order.</param>
public sealed record PairedResult(string Key, string A, string B, IReadOnlyList<PairedStatistic> Statistics)
{
    /// <summary>Per-tag paired differences with their intervals (<c>paired.KEY.by_tag</c>), empty when the run had no bootstrap.</summary>
    public IReadOnlyDictionary<string, IReadOnlyList<PairedStatistic>> ByTag { get; init; } = new Dictionary<string, IReadOnlyList<PairedStatistic>>(StringComparer.Ordinal);
}

/// <summary>A parsed <c>score --json</c> document.</summary>
/// <param name="Systems">Systems in file order.</param>
/// <param name="Paired">Paired comparisons (empty for one system).</param>
/// <param name="Settings">The effective settings, flattened to dotted keys in file order.</param>
public sealed record ScoreDocument(
    IReadOnlyList<SystemResult> Systems,
    IReadOnlyList<PairedResult> Paired,
    IReadOnlyList<KeyValuePair<string, string>> Settings)
{
    /// <summary>A setting's value text, or null.</summary>
    public string? Setting(string key) => Settings.FirstOrDefault(kv => kv.Key == key).Value;
}

/// <summary>Mean lateral error at one look-ahead distance, over the true-positive pairs that reach it.</summary>
/// <param name="Key">Distance key as written in the score file (<c>"20"</c>).</param>
/// <param name="DistanceM">Distance ahead, metres.</param>
/// <param name="Pairs">Pairs measured at the distance.</param>
/// <param name="MeanM">Mean |ΔY|, metres (NaN without pairs).</param>
public sealed record GroundLateral(string Key, double DistanceM, long Pairs, double MeanM);

/// <summary>Road-plane errors of a tally (score run with <c>--camera</c>), from the score file's <c>ground</c> object.</summary>
/// <param name="Lateral">Lateral error per look-ahead distance, nearest first.</param>
/// <param name="EgoWidthFrames">Frames with an ego-lane width on both sides.</param>
/// <param name="EgoWidthMeanM">Mean |ΔW| of the ego lane, metres (NaN without frames).</param>
/// <param name="CurvaturePairs">Pairs with a curvature on both sides.</param>
/// <param name="CurvatureMeanPerM">Mean |Δκ|, 1/m (NaN without pairs).</param>
public sealed record GroundSummary(IReadOnlyList<GroundLateral> Lateral, long EgoWidthFrames, double EgoWidthMeanM, long CurvaturePairs, double CurvatureMeanPerM);
