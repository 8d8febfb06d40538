namespace LaneBaseline.Core.Options;

/// <summary>Robust quadratic fit x = A·y² + B·y + C in bird's-eye coordinates and sampling back to the image.</summary>
public sealed record FitOptions
{
    /// <summary>A window centroid is a RANSAC inlier within this distance of the curve, in bird's-eye pixels (0.5–100). Default 4.</summary>
    public double InlierTolerancePx { get; init; } = 4;

    /// <summary>Fewest inlier windows a lane needs (3–64). Default 3.</summary>
    public int MinInlierWindows { get; init; } = 3;

    /// <summary>Largest |A| kept, in 1/bird's-eye-pixel; sharper curves fall back to a straight line (0–1). Default 0.004.</summary>
    public double MaxCurvature { get; init; } = 0.004;

    /// <summary>Vertical spacing of the output points, in image pixels (1–200). Default 20.</summary>
    public int PointSpacingPx { get; init; } = 20;

    /// <summary>Whether each lane is drawn up to the far edge of the warped area (true) or only to its farthest window with evidence (false). Default true.</summary>
    public bool ExtendToFarEdge { get; init; } = true;

    /// <summary>Share of the rows between a lane's far end and the horizon over which it is continued along its image tangent (0–0.95; 0 = off). Default 0.75.</summary>
    public double HorizonExtensionFraction { get; init; } = 0.75;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "fit.inlierTolerancePx", InlierTolerancePx, 0.5, 100);
        OptionsChecks.Range(f, "fit.minInlierWindows", MinInlierWindows, 3, 64);
        OptionsChecks.Range(f, "fit.maxCurvature", MaxCurvature, 0, 1);
        OptionsChecks.Range(f, "fit.pointSpacingPx", PointSpacingPx, 1, 200);
        OptionsChecks.Range(f, "fit.horizonExtensionFraction", HorizonExtensionFraction, 0, 0.95);
    }
}
