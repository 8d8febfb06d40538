namespace LaneBaseline.Core.Options;

/// <summary>
/// Paint thresholds of the colour/evidence stage. Lightness is the HLS lightness (max+min)/2 of the 8-bit BGR
/// pixel (0–255); yellowness is min(R,G) − B (0–255), a cheap stand-in for the Lab b* axis. Thresholds are relative
/// to the road's own lightness statistics inside the region of interest (median and spread), with absolute floors.
/// </summary>
public sealed record ColorOptions
{
    /// <summary>White paint must exceed the road median lightness by at least this many lightness units (0–255). Default 30.</summary>
    public double WhiteMinContrast { get; init; } = 30;

    /// <summary>White paint must also exceed the road median by this many road spreads (dimensionless, 0–20). Default 3.</summary>
    public double WhiteSpreadFactor { get; init; } = 3;

    /// <summary>Absolute lightness floor for white paint, in lightness units (0–255). Default 45.</summary>
    public double WhiteMinLightness { get; init; } = 45;

    /// <summary>Minimum yellowness min(R,G) − B for yellow paint, in 8-bit units (0–255). Default 28.</summary>
    public double YellowMinChroma { get; init; } = 28;

    /// <summary>Yellow paint must exceed the road median lightness by this many lightness units (0–255). Default 8.</summary>
    public double YellowMinContrast { get; init; } = 8;

    /// <summary>Pixel stride of the road-statistics sample, in pixels (1–16). Default 4.</summary>
    public int StatisticsStridePx { get; init; } = 4;

    /// <summary>Half width of the road-statistics wedge at the bottom row, as a fraction of the frame width (0.02–1). Default 0.25.</summary>
    public double StatisticsHalfWidthFraction { get; init; } = 0.25;

    /// <summary>
    /// Blurred grey level (0–255) at or above which a run wider than two marking widths is a saturated blob (sun,
    /// reflection, lamp) whose surroundings give no marking evidence; 255 turns the test off. Default 245.
    /// </summary>
    public double SaturatedBlobLightness { get; init; } = 245;

    /// <summary>
    /// Grey-world colour constancy before the white and yellow tests (Buchsbaum 1980): the mean B, G and R of the
    /// road-statistics wedge give per-channel gains (clamped to 1/4–4) that make the road's mean colour grey, so a
    /// sodium or dusk cast neither pushes white paint out of the white band nor makes the whole road yellow. The ridge
    /// test (grey image) is not affected. Default true.
    /// </summary>
    public bool GreyWorld { get; init; } = true;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "color.saturatedBlobLightness", SaturatedBlobLightness, 0, 255);
        OptionsChecks.Range(f, "color.whiteMinContrast", WhiteMinContrast, 0, 255);
        OptionsChecks.Range(f, "color.whiteSpreadFactor", WhiteSpreadFactor, 0, 20);
        OptionsChecks.Range(f, "color.whiteMinLightness", WhiteMinLightness, 0, 255);
        OptionsChecks.Range(f, "color.yellowMinChroma", YellowMinChroma, 0, 255);
        OptionsChecks.Range(f, "color.yellowMinContrast", YellowMinContrast, 0, 255);
        OptionsChecks.Range(f, "color.statisticsStridePx", StatisticsStridePx, 1, 16);
        OptionsChecks.Range(f, "color.statisticsHalfWidthFraction", StatisticsHalfWidthFraction, 0.02, 1);
    }
}
