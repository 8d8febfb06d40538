namespace LaneBaseline.Reporting;

/// <summary>The "largest regressions" gallery: frames ranked by (network − baseline) frame F1, worst first.</summary>
/// <param name="Network">The system checked.</param>
/// <param name="Baseline">The system it is checked against.</param>
/// <param name="Frames">The shown frames, worst first.</param>
/// <param name="Worse">Frames where the network's frame F1 is below the baseline's.</param>
/// <param name="Better">Frames where it is above.</param>
/// <param name="Total">Frames compared.</param>
/// <param name="Selection">One sentence: how the frames were chosen, the caps.</param>
public sealed record RegressionGallery(string Network, string Baseline, IReadOnlyList<RegressionFrame> Frames, int Worse, int Better, int Total, string Selection);
