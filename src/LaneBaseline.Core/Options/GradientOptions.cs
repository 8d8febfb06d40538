namespace LaneBaseline.Core.Options;

/// <summary>
/// Gradient evidence: Gaussian blur and Canny edges (for the Hough segments and the vanishing point), and the
/// paired horizontal-gradient gate ("ridge": a bright bar between a rising and a falling step in x) whose scale
/// follows the expected marking width at each row.
/// </summary>
public sealed record GradientOptions
{
    /// <summary>Gaussian blur kernel before Canny, in pixels (odd, 1–15; 1 = no blur). Default 5.</summary>
    public int BlurKernelPx { get; init; } = 5;

    /// <summary>Canny lower hysteresis threshold, in Sobel gradient-magnitude units of the 8-bit image (1–1000). Default 50.</summary>
    public double CannyLowThreshold { get; init; } = 50;

    /// <summary>Canny upper:lower threshold ratio (dimensionless, 1–5; Canny recommends 2–3). Default 2.5.</summary>
    public double CannyHysteresisRatio { get; init; } = 2.5;

    /// <summary>Both steps of the ridge gate must rise by at least this many lightness units (0–255). Default 14.</summary>
    public double RidgeMinStep { get; init; } = 14;

    /// <summary>Both ridge steps must also exceed this many road texture sigmas (dimensionless, 0–20). Default 2.</summary>
    public double RidgeSpreadFactor { get; init; } = 2;

    /// <summary>Expected marking width at the bottom image row, as a fraction of the frame width (0.002–0.2). Default 0.025.</summary>
    public double MarkingWidthFraction { get; init; } = 0.025;

    /// <summary>
    /// Largest angle between a marking run's local orientation (structure tensor) and the direction to the vanishing
    /// point, in degrees (0–90; 90 keeps everything), at the vanishing point itself. Default 8.
    /// </summary>
    public double OrientationToleranceDeg { get; init; } = 8;

    /// <summary>Growth of that angle per frame height of distance from the vanishing point, degrees (0–90). Default 12.</summary>
    public double OrientationToleranceGrowthDeg { get; init; } = 12;

    /// <summary>Smallest structure-tensor coherence (λ1 − λ2) / (λ1 + λ2) at which the orientation test applies (0–1). Default 0.5.</summary>
    public double OrientationMinCoherence { get; init; } = 0.5;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "gradient.blurKernelPx", BlurKernelPx, 1, 15);
        OptionsChecks.Odd(f, "gradient.blurKernelPx", BlurKernelPx);
        OptionsChecks.Range(f, "gradient.cannyLowThreshold", CannyLowThreshold, 1, 1000);
        OptionsChecks.Range(f, "gradient.cannyHysteresisRatio", CannyHysteresisRatio, 1, 5);
        OptionsChecks.Range(f, "gradient.ridgeMinStep", RidgeMinStep, 0, 255);
        OptionsChecks.Range(f, "gradient.ridgeSpreadFactor", RidgeSpreadFactor, 0, 20);
        OptionsChecks.Range(f, "gradient.markingWidthFraction", MarkingWidthFraction, 0.002, 0.2);
        OptionsChecks.Range(f, "gradient.orientationToleranceDeg", OrientationToleranceDeg, 0, 90);
        OptionsChecks.Range(f, "gradient.orientationToleranceGrowthDeg", OrientationToleranceGrowthDeg, 0, 90);
        OptionsChecks.Range(f, "gradient.orientationMinCoherence", OrientationMinCoherence, 0, 1);
    }
}
