using LaneBaseline.Core.Results;

namespace LaneBaseline.Core.Calibration;

/// <summary>
/// The evidence features of a lane that the confidence calibration maps to a probability: the one place that names
/// them. A new <see cref="LaneEstimate"/> field becomes a feature with one line in <see cref="All"/>; a stored
/// calibration names its features, so a preset fitted with a feature this build does not know is rejected.
/// </summary>
public static class LaneFeatures
{
    /// <summary>
    /// Every feature this build knows: its name (as written in presets), how it is read from a lane, and the sign its
    /// weight must have (+1: more evidence, more likely true; −1: less likely; 0: either). A fit whose weight takes
    /// the other sign drops that feature (see <see cref="LaneCalibration.Fit"/>), so the mapping stays monotone in
    /// the evidence and cannot punish a strong marking outside the fitted range.
    /// </summary>
    public static IReadOnlyList<(string Name, Func<LaneEstimate, double> Read, int Sign)> All { get; } =
    [
        ("rawScore", l => l.Score, +1),
        ("inlierMass", l => Math.Log(1 + Math.Max(0, l.InlierMass)), +1), // log: evidence mass spans three decades
        ("coverage", l => l.Coverage, +1),
        ("rmsPx", l => l.RmsPx, -1),
        ("evidenceKeptShare", l => double.IsFinite(l.EvidenceKeptShare) ? l.EvidenceKeptShare : 1, +1), // reflections removed: less left, less sure
        ("headingDeviationDeg", l => double.IsFinite(l.HeadingDeviationDeg) ? Math.Abs(l.HeadingDeviationDeg) : 0, -1),
        ("parallelDeviation", l => Math.Log(1 + (double.IsFinite(l.ParallelDeviationPx) ? Math.Min(Math.Abs(l.ParallelDeviationPx), 50) : 50)), -1), // a lone lane has no support from others
        ("jointShare", l => double.IsFinite(l.JointShare) ? l.JointShare : 0.5, +1), // agreement with the joint model; a lone lane is unconfirmed
        ("fanOut", l => double.IsFinite(l.FanOut) ? l.FanOut : 0, -1), // fans out like an image-vertical streak
        ("unusedCandidates", l => Math.Log(1 + (double.IsFinite(l.UnusedCandidates) ? l.UnusedCandidates : 0)), -1), // a cluttered frame: other boundary-like evidence was refused
        ("markingContrast", l => double.IsFinite(l.MarkingContrast) ? Math.Clamp(l.MarkingContrast, 0, 4) : 0, +1), // paint is brighter than the road beside it
        ("widthMismatch", l => double.IsFinite(l.WidthMismatch) ? Math.Min(l.WidthMismatch, 3) : 3, -1), // a streak or speck, not a marking of the perspective width
        ("paintShare", l => double.IsFinite(l.PaintShare) ? l.PaintShare : 0, +1), // evidence that passed a paint-colour test
        ("nearSupport", l => double.IsFinite(l.NearSupport) ? l.NearSupport : 0, +1), // near half seen, not extrapolated
        ("extrapolatedShare", l => double.IsFinite(l.ExtrapolatedShare) ? l.ExtrapolatedShare : 0, -1), // image length below the nearest evidence
        ("bottomLeverage", l => Math.Log(1 + (double.IsFinite(l.BottomLeverage) ? Math.Clamp(l.BottomLeverage, 0, 50) : 0)), -1), // far-only evidence extrapolated to the bottom row
        ("outerSlot", l => Math.Max(0, Math.Abs(l.Slot) - 1), -1), // 0 for the ego boundaries, 1 for +-2, 2 for +-3: farther out, fewer and fainter pixels
    ];

    /// <summary>The names of <see cref="All"/>, in order.</summary>
    public static IReadOnlyList<string> Names { get; } = [.. All.Select(f => f.Name)];

    /// <summary>Position of a feature name in <see cref="All"/>, or −1 when this build does not know it.</summary>
    public static int IndexOf(string name) => Names.ToList().IndexOf(name);

    /// <summary>Writes the lane's features, in the order of <paramref name="indices"/> (positions in <see cref="All"/>), to <paramref name="into"/>.</summary>
    public static void Of(in LaneEstimate lane, ReadOnlySpan<int> indices, Span<double> into)
    {
        for (int i = 0; i < indices.Length; i++)
        {
            into[i] = All[indices[i]].Read(lane);
        }
    }

    /// <summary>All features of a lane, in the order of <see cref="All"/>.</summary>
    public static double[] Of(in LaneEstimate lane)
    {
        var v = new double[All.Count];
        for (int i = 0; i < v.Length; i++)
        {
            v[i] = All[i].Read(lane);
        }

        return v;
    }
}
