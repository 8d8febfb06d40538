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

    /// <summary>Checks every value against its documented range.</summary>
    /// <returns>All findings (empty when valid), never throwing on the first.</returns>
    public IReadOnlyList<OptionsFinding> Validate()
    {
        var findings = new List<OptionsFinding>();
        Color.Validate(findings);
        Gradient.Validate(findings);
        Region.Validate(findings);
        Hough.Validate(findings);
        Warp.Validate(findings);
        Search.Validate(findings);
        Fit.Validate(findings);
        Confidence.Validate(findings);
        Tracking.Validate(findings);
        Limits.Validate(findings);
        return findings;
    }
}
