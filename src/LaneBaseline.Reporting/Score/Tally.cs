namespace LaneBaseline.Reporting.Score;

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
