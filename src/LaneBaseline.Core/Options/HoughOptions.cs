namespace LaneBaseline.Core.Options;

/// <summary>Progressive probabilistic Hough transform (OpenCV <c>HoughLinesP</c>) and segment filtering.</summary>
public sealed record HoughOptions
{
    /// <summary>Distance resolution of the accumulator, in pixels (0.5–10). Default 1.</summary>
    public double RhoPx { get; init; } = 1;

    /// <summary>Angle resolution of the accumulator, in degrees (0.1–10). Default 1.</summary>
    public double ThetaStepDeg { get; init; } = 1;

    /// <summary>Accumulator votes a line needs (1–1000). Default 30.</summary>
    public int Votes { get; init; } = 30;

    /// <summary>Shortest segment kept, in pixels (1–1000). Default 25.</summary>
    public double MinLineLengthPx { get; init; } = 25;

    /// <summary>Largest gap bridged inside one segment, in pixels (0–500). Default 8.</summary>
    public double MaxLineGapPx { get; init; } = 8;

    /// <summary>Smallest segment angle from the horizontal, in degrees (0–90). Default 10.</summary>
    public double MinAngleDeg { get; init; } = 10;

    /// <summary>Largest segment angle from the horizontal, in degrees (0–90). Default 88.</summary>
    public double MaxAngleDeg { get; init; } = 88;

    /// <summary>
    /// Canny and Hough run on the search band resized by this factor (0.25–1; 0.5 = half resolution, a quarter of
    /// the pixels); the pixel values above stay in full-frame pixels and are scaled with it. Default 0.5.
    /// </summary>
    public double ImageScale { get; init; } = 0.5;

    /// <summary>Longest segments kept for the vanishing-point search (4–500). Default 60.</summary>
    public int MaxSegments { get; init; } = 60;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "hough.rhoPx", RhoPx, 0.5, 10);
        OptionsChecks.Range(f, "hough.thetaStepDeg", ThetaStepDeg, 0.1, 10);
        OptionsChecks.Range(f, "hough.votes", Votes, 1, 1000);
        OptionsChecks.Range(f, "hough.minLineLengthPx", MinLineLengthPx, 1, 1000);
        OptionsChecks.Range(f, "hough.maxLineGapPx", MaxLineGapPx, 0, 500);
        OptionsChecks.Range(f, "hough.minAngleDeg", MinAngleDeg, 0, 90);
        OptionsChecks.Range(f, "hough.maxAngleDeg", MaxAngleDeg, 0, 90);
        OptionsChecks.Less(f, "hough.minAngleDeg", MinAngleDeg, "hough.maxAngleDeg", MaxAngleDeg);
        OptionsChecks.Range(f, "hough.maxSegments", MaxSegments, 4, 500);
        OptionsChecks.Range(f, "hough.imageScale", ImageScale, 0.25, 1);
    }
}
