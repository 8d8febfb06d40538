using OpenCvSharp;
using Xunit;
using static LaneBaseline.Vision.Tests.Stages.MetricBirdsEyeSearch;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// A fit through far specks beside a continuous line: closer to the line than any lane width, extrapolated to the
/// bottom row from the far rows only, it must not take the line's slot. Constructed bird's-eye evidence in the default
/// camera's metric view (0.05 m/px, 481 × 717, camera column 240, 16 windows of 44.8 rows, smallest plausible lane
/// width 2.5 m = 50 px).
/// Source: two boundaries of one road are at least a lane width apart (common practice); lane widths 2.5–4.5 m as in
/// <see cref="MetricLaneSpanTests"/>; the near part of a boundary, where a bird's-eye pixel is a small patch of road,
/// is the better measured (common practice).
/// </summary>
public sealed class ExtrapolatedNeighbourTests
{
    /// <summary>Far specks: one 5 × 6 blob at column <paramref name="x"/> in each of the six farthest windows (k = 10..15).</summary>
    private static void FarSpecks(Mat view, int x)
    {
        for (int k = 10; k < 16; k++)
        {
            int centre = (int)Math.Round(717 - ((k + 0.5) * 717.0 / 16));
            Cv2.Rectangle(view, new Rect(x - 2, centre - 3, 5, 6), Scalar.All(255), -1);
        }
    }

    [Fact]
    public void FarOnlyFitBesideASolidLine_DoesNotHideIt()
    {
        // Ego lane 3.5 m: solids at −1.75 m (205) and +1.75 m (275). Right of the left solid, 21 px (about 1 m) away,
        // far specks at 226, and one speck at 236 in window 4 that seeds a candidate there (more than the histogram's
        // 30 px from the solid). That candidate's fit runs through the far specks and is extrapolated to the bottom row;
        // as the boundary nearest the camera it would be the −1 (too close to the +1 for a lane, so the +1 is refused).
        SortedDictionary<int, double> lanes = Search(view =>
        {
            Solid(view, 205);
            Solid(view, 275);
            FarSpecks(view, 226);
            Cv2.Rectangle(view, new Rect(234, 500, 5, 8), Scalar.All(255), -1);
        });
        Assert.Equal(new[] { -1, 1 }, lanes.Keys.ToArray());
        Assert.Equal(205, lanes[-1], 0);
        Assert.Equal(275, lanes[1], 0);
    }
}
