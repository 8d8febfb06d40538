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

    /// <summary>
    /// Road lightness (median HLS lightness of the road wedge after the grey-world gains, 0–255) below which the ridge
    /// test runs on a locally equalised copy of the grey band (CLAHE, Zuiderveld 1994) instead of the plain one, to
    /// recover faint paint in low light; 0 never equalises, 255 always does. Default 80.
    /// </summary>
    public double ClaheMaxRoadLightness { get; init; } = 80;

    /// <summary>
    /// Road lightness (as for <see cref="ClaheMaxRoadLightness"/>, 0–255) at or above which the ridge test also runs on
    /// the equalised copy: a veiled road under a low sun ahead is bright and its paint contrast is compressed; 255 turns
    /// this trigger off. Default 150.
    /// </summary>
    public double ClaheMinVeilLightness { get; init; } = 150;

    /// <summary>
    /// On a veiled road (<see cref="ClaheMinVeilLightness"/>) a second ridge test on the plain blurred grey, relative to
    /// the headroom left below white: by Koschmieder's law an added veil of luminance A gives I = J·t + A·(1 − t), so a
    /// marking's step over its background shrinks by t exactly as the background's distance below A does, and
    /// step / (A − background) is unchanged by the veil (A taken as 255, the sensor's white). The step must reach the
    /// plain ridge threshold scaled by (255 − side) / (255 − road median), and at least this many grey levels (0–255;
    /// 255 turns the test off). Default 4.
    /// </summary>
    public double VeilRidgeMinStep { get; init; } = 4;

    /// <summary>
    /// The veil-headroom ridge (<see cref="VeilRidgeMinStep"/>) runs only where both side means of the plain blurred grey
    /// are at least this grey level (0–255): a strong local veil, the low sun's reflection on the road, where the
    /// equalised ridge misses paint; elsewhere the equalised ridge alone decides. Default 225 (chosen on validation
    /// among 0, 215, 225 and 235).
    /// </summary>
    public double VeilRidgeMinBackground { get; init; } = 225;

    /// <summary>CLAHE clip limit: the histogram of a tile is clipped at this multiple of its mean bin count (1–40). Default 2.</summary>
    public double ClaheClipLimit { get; init; } = 2;

    /// <summary>CLAHE tiles across the frame width (the band is cut into square-ish tiles of width / this, 2–32). Default 8.</summary>
    public int ClaheTilesAcross { get; init; } = 8;

    /// <summary>
    /// Grey level (0–255) from which a pixel above the horizon (or just below it) is a light source whose reflection on a
    /// wet road lies straight below it; evidence in those columns below the light is cleared. 255 turns the test off.
    /// Default 250.
    /// </summary>
    public double LightSourceLightness { get; init; } = 250;

    /// <summary>How far below the horizon light sources are looked for (vehicle lights), fraction of the height (0–0.5). Default 0.1.</summary>
    public double LightSourceBelowHorizonFraction { get; init; } = 0.1;

    /// <summary>
    /// Road lightness (median HLS lightness of the road wedge after the grey-world gains, 0–255) below which the
    /// mirror test runs: only at night, when bright pixels near the horizon are lamps and lights, not sky. Default 80.
    /// </summary>
    public double MirrorMaxRoadLightness { get; init; } = 80;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "color.lightSourceLightness", LightSourceLightness, 0, 255);
        OptionsChecks.Range(f, "color.lightSourceBelowHorizonFraction", LightSourceBelowHorizonFraction, 0, 0.5);
        OptionsChecks.Range(f, "color.mirrorMaxRoadLightness", MirrorMaxRoadLightness, 0, 255);
        OptionsChecks.Range(f, "color.claheMaxRoadLightness", ClaheMaxRoadLightness, 0, 255);
        OptionsChecks.Range(f, "color.claheMinVeilLightness", ClaheMinVeilLightness, 0, 255);
        OptionsChecks.Range(f, "color.veilRidgeMinStep", VeilRidgeMinStep, 0, 255);
        OptionsChecks.Range(f, "color.veilRidgeMinBackground", VeilRidgeMinBackground, 0, 255);
        OptionsChecks.Range(f, "color.claheClipLimit", ClaheClipLimit, 1, 40);
        OptionsChecks.Range(f, "color.claheTilesAcross", ClaheTilesAcross, 2, 32);
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
