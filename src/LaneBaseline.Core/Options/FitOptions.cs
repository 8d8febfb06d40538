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

    /// <summary>
    /// Whether the reported boundaries are refitted jointly (shared A and B, own C; RANSAC over all their windows) and a
    /// boundary that disagrees with the others is dropped (true/false). Default true.
    /// </summary>
    public bool JointModel { get; init; } = true;

    /// <summary>
    /// A boundary keeps its place in the joint model only when the joint curve takes at least this share of the window
    /// mass its own fit took (0–1). Default 0.5.
    /// </summary>
    public double JointMinShare { get; init; } = 0.5;

    /// <summary>
    /// Whether a boundary kept by the joint model is reported with its joint curve (true) or its own curve (false; the
    /// joint model then drops disagreeing boundaries, measures agreement, and refits only a boundary whose own
    /// curvature is an outlier among the boundaries, with the joint curvature and its own heading and offset, or whose
    /// curve leaves the boundaries' fan of headings where it has no near windows, with the fan's heading).
    /// Default false.
    /// </summary>
    public bool JointRefit { get; init; }

    /// <summary>
    /// Fewest windows on the joint curve for a missing boundary next to the kept ones to be added by the model-guided
    /// search (0–64; 0 = off). Default 2.
    /// </summary>
    public int JointRecoverMinWindows { get; init; } = 2;

    /// <summary>
    /// How much a candidate's raw confidence is lowered when its bird's-eye direction fans out from the camera's ground
    /// point instead of running parallel: raw score × (1 − penalty × fan-out), fan-out 0–1 (0–1; 0 = off). Default 0.
    /// </summary>
    public double FanOutPenalty { get; init; }

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "fit.inlierTolerancePx", InlierTolerancePx, 0.5, 100);
        OptionsChecks.Range(f, "fit.minInlierWindows", MinInlierWindows, 3, 64);
        OptionsChecks.Range(f, "fit.maxCurvature", MaxCurvature, 0, 1);
        OptionsChecks.Range(f, "fit.pointSpacingPx", PointSpacingPx, 1, 200);
        OptionsChecks.Range(f, "fit.horizonExtensionFraction", HorizonExtensionFraction, 0, 0.95);
        OptionsChecks.Range(f, "fit.jointMinShare", JointMinShare, 0, 1);
        OptionsChecks.Range(f, "fit.fanOutPenalty", FanOutPenalty, 0, 1);
        OptionsChecks.Range(f, "fit.jointRecoverMinWindows", JointRecoverMinWindows, 0, 64);
    }
}
