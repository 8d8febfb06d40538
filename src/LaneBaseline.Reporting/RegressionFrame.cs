namespace LaneBaseline.Reporting;

/// <summary>One frame of the regression gallery.</summary>
/// <param name="Thumb">The network's thumbnail (true positives, false positives and misses drawn apart) and its counts.</param>
/// <param name="BaselineF1">The baseline's frame F1 at IoU 0.50.</param>
/// <param name="FullSizeHref">Relative link to the full-size overlay written beside the page, or null.</param>
public sealed record RegressionFrame(GalleryFrame Thumb, double BaselineF1, string? FullSizeHref)
{
    /// <summary>Network frame F1 − baseline frame F1 (negative: the network is worse).</summary>
    public double Delta => Thumb.F1 - BaselineF1;
}
