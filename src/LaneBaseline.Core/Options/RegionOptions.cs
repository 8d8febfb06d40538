namespace LaneBaseline.Core.Options;

/// <summary>
/// Region of interest and vanishing point. Without a camera file the vanishing point (and so the horizon row) is
/// estimated from the Hough segments of each frame; when that fails, the preset point
/// (<see cref="DefaultVanishingXFraction"/>, <see cref="DefaultHorizonFraction"/>) is the last resort.
/// Fractions are of the frame width (x) or height (y), origin top-left, y down.
/// </summary>
public sealed record RegionOptions
{
    /// <summary>Whether to estimate the vanishing point from the frame (true) or always use the preset point (false). Default true.</summary>
    public bool EstimateVanishingPoint { get; init; } = true;

    /// <summary>Top of the band searched for Hough segments, as a fraction of the frame height (0–0.95). Default 0.35.</summary>
    public double SearchTopFraction { get; init; } = 0.35;

    /// <summary>Preset horizon row, as a fraction of the frame height (0.05–0.9). Default 0.5.</summary>
    public double DefaultHorizonFraction { get; init; } = 0.5;

    /// <summary>Preset vanishing-point column, as a fraction of the frame width (0–1). Default 0.5.</summary>
    public double DefaultVanishingXFraction { get; init; } = 0.5;

    /// <summary>Highest plausible horizon, as a fraction of the frame height (0–1). Default 0.2.</summary>
    public double MinHorizonFraction { get; init; } = 0.2;

    /// <summary>Lowest plausible horizon, as a fraction of the frame height (0–1). Default 0.7.</summary>
    public double MaxHorizonFraction { get; init; } = 0.7;

    /// <summary>Largest plausible offset of the vanishing point from the frame centre column, as a fraction of the width (0–1). Default 0.25.</summary>
    public double MaxVanishingOffsetFraction { get; init; } = 0.25;

    /// <summary>A segment supports a vanishing point when its line passes within this fraction of the frame width (0.001–0.2). Default 0.012.</summary>
    public double VanishingToleranceFraction { get; init; } = 0.012;

    /// <summary>Weight of the previous vanishing point when smoothing over a sequence (0–0.99; tracking only). Default 0.8.</summary>
    public double Smoothing { get; init; } = 0.8;

    /// <summary>A Hough segment within this angle of the image vertical does not vote for the vanishing point, in
    /// degrees (0–45; 0 = every segment votes). Default 10. Such a segment fixes a column but hardly a row, and the
    /// specular streaks of lights on a wet road are image-vertical.</summary>
    public double VerticalToleranceDeg { get; init; } = 10;

    /// <summary>Grey level (0–255) of a light source above the horizon; in a dark frame a Hough segment whose upper end
    /// touches one (within <see cref="LightReachFraction"/> above it) does not vote for the vanishing point (the rim of
    /// the light or of its reflection on a wet road). 255 = off. Default 250.</summary>
    public double LightSourceLightness { get; init; } = 250;

    /// <summary>How far above a segment's upper end a light still touches it, fraction of the frame width (0–1).
    /// Default 0.02. A lamp higher above the end (a real far dash under a street lamp) does not stop the segment voting.</summary>
    public double LightReachFraction { get; init; } = 0.02;

    /// <summary>A frame is dark (the light-source test applies) when the median grey of the bottom quarter of the
    /// frame's centre half is below this (0–255). Default 80.</summary>
    public double DarkRoadLightness { get; init; } = 80;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "region.searchTopFraction", SearchTopFraction, 0, 0.95);
        OptionsChecks.Range(f, "region.defaultHorizonFraction", DefaultHorizonFraction, 0.05, 0.9);
        OptionsChecks.Range(f, "region.defaultVanishingXFraction", DefaultVanishingXFraction, 0, 1);
        OptionsChecks.Range(f, "region.minHorizonFraction", MinHorizonFraction, 0, 1);
        OptionsChecks.Range(f, "region.maxHorizonFraction", MaxHorizonFraction, 0, 1);
        OptionsChecks.Less(f, "region.minHorizonFraction", MinHorizonFraction, "region.maxHorizonFraction", MaxHorizonFraction);
        OptionsChecks.Range(f, "region.maxVanishingOffsetFraction", MaxVanishingOffsetFraction, 0, 1);
        OptionsChecks.Range(f, "region.vanishingToleranceFraction", VanishingToleranceFraction, 0.001, 0.2);
        OptionsChecks.Range(f, "region.smoothing", Smoothing, 0, 0.99);
        OptionsChecks.Range(f, "region.verticalToleranceDeg", VerticalToleranceDeg, 0, 45);
        OptionsChecks.Range(f, "region.lightSourceLightness", LightSourceLightness, 0, 255);
        OptionsChecks.Range(f, "region.darkRoadLightness", DarkRoadLightness, 0, 255);
        OptionsChecks.Range(f, "region.lightReachFraction", LightReachFraction, 0, 1);
    }
}
