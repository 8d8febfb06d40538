namespace LaneBaseline.Core.Options;

/// <summary>
/// The whole configuration of the classical pipeline: one section per stage in the fixed stage order. A partial
/// preset states only what differs; every unstated key keeps its default. Load with <see cref="PresetLoader"/>.
/// </summary>
public sealed record PipelineOptions
{
    /// <summary>Colour thresholds.</summary>
    public ColorOptions Color { get; init; } = new();

    /// <summary>Blur, Canny and the ridge gate.</summary>
    public GradientOptions Gradient { get; init; } = new();

    /// <summary>Region of interest and vanishing point.</summary>
    public RegionOptions Region { get; init; } = new();

    /// <summary>Probabilistic Hough transform.</summary>
    public HoughOptions Hough { get; init; } = new();

    /// <summary>Bird's-eye warp.</summary>
    public WarpOptions Warp { get; init; } = new();

    /// <summary>Sliding-window search.</summary>
    public SearchOptions Search { get; init; } = new();

    /// <summary>Robust quadratic fit.</summary>
    public FitOptions Fit { get; init; } = new();

    /// <summary>Per-lane confidence.</summary>
    public ConfidenceOptions Confidence { get; init; } = new();

    /// <summary>Tracking over sequences.</summary>
    public TrackingOptions Tracking { get; init; } = new();

    /// <summary>Accepted frame sizes.</summary>
    public LimitsOptions Limits { get; init; } = new();

    /// <summary>Fitted confidence calibration, or null (absent) for the raw confidences.</summary>
    public CalibrationOptions? Calibration { get; init; }

    /// <summary>The metric bird's-eye view used with a camera file, or null (absent) for its defaults.</summary>
    public MetricViewOptions? Metric { get; init; }

    /// <summary>Checks every value against its documented range.</summary>
    /// <returns>All findings (empty when valid), never throwing on the first.</returns>
    public IReadOnlyList<OptionsFinding> Validate()
    {
        var findings = new List<OptionsFinding>();

        // A section written with no keys ("gradient:" alone) deserializes as null: report it instead of crashing.
        (string Key, object? Section, Action<List<OptionsFinding>>? Check)[] sections =
        [
            ("color", Color, Color is null ? null : Color.Validate),
            ("gradient", Gradient, Gradient is null ? null : Gradient.Validate),
            ("region", Region, Region is null ? null : Region.Validate),
            ("hough", Hough, Hough is null ? null : Hough.Validate),
            ("warp", Warp, Warp is null ? null : Warp.Validate),
            ("search", Search, Search is null ? null : Search.Validate),
            ("fit", Fit, Fit is null ? null : Fit.Validate),
            ("confidence", Confidence, Confidence is null ? null : Confidence.Validate),
            ("tracking", Tracking, Tracking is null ? null : Tracking.Validate),
            ("limits", Limits, Limits is null ? null : Limits.Validate),
        ];
        foreach ((string key, object? section, Action<List<OptionsFinding>>? check) in sections)
        {
            if (section is null || check is null)
            {
                findings.Add(new OptionsFinding(key, "section is empty: give its keys or leave the section out"));
            }
            else
            {
                check(findings);
            }
        }

        Calibration?.Validate(findings);
        Metric?.Validate(findings);
        return findings;
    }
}
