namespace LaneBaseline.Core.Metrics;

/// <summary>What the scorer measures with: thresholds, lane width and point tolerance overrides.</summary>
public sealed record ScoreSettings
{
    /// <summary>Widest accepted <c>--lane-width-px</c> (OpenCV draws at most 32767 px thick; 1000 px is far beyond any lane).</summary>
    public const int MaxLaneWidthPx = 1000;

    /// <summary>Most accepted bootstrap resamples (100 times the default; time grows with resamples x frames).</summary>
    public const int MaxBootstrapResamples = 100_000;

    /// <summary>Fixed lane width in pixels for the IoU rasterisation, or null for <c>round(30 * width / 1640)</c>.</summary>
    public int? LaneWidthPx { get; init; }

    /// <summary>Fixed base point tolerance in pixels, or null for <c>20 * width / 1280</c>.</summary>
    public double? TolerancePx { get; init; }

    /// <summary>Camera for metric-space errors (lanes projected to the road plane), or null.</summary>
    public Geometry.CameraModel? Camera { get; init; }

    /// <summary>Extra IoU thresholds reported beside the defaults (from <c>--iou</c>).</summary>
    public IReadOnlyList<IouThreshold> ExtraThresholds { get; init; } = [];

    /// <summary>
    /// Every threshold evaluated, ascending and distinct: 0.10, 0.30, the mF1 set 0.50:0.05:0.95 (0.75 among them)
    /// and the extras.
    /// </summary>
    public IReadOnlyList<IouThreshold> Thresholds =>
        [.. IouThreshold.Reported.Concat(IouThreshold.MeanF1Set).Concat(ExtraThresholds).Distinct().Order()];

    /// <summary>Position of IoU 0.50 in <see cref="Thresholds"/> (the gate, the intervals and the CSV use it).</summary>
    public int HalfIndex => Thresholds.ToList().IndexOf(IouThreshold.Half);

    /// <summary>The rasterisation line width for a frame width: the override, else <c>round(30 * w / 1640)</c>, at least 1.</summary>
    public int LaneWidthFor(int frameWidth) =>
        LaneWidthPx ?? Math.Max(1, (int)Math.Round(30.0 * frameWidth / 1640.0, MidpointRounding.ToEven));

    /// <summary>The base point tolerance for a frame width: the override, else <c>20 * w / 1280</c>.</summary>
    public double ToleranceFor(int frameWidth) => TolerancePx ?? (20.0 * frameWidth / 1280.0);
}
