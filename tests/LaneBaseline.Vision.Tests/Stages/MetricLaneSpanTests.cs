using OpenCvSharp;
using Xunit;
using static LaneBaseline.Vision.Tests.Stages.MetricBirdsEyeSearch;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// Slots in the metric bird's-eye view when the ego lane's dashes are veiled (a low sun ahead): the nearest boundaries
/// left and right are then two or three lane widths apart, and are read as such only when the boundary between them
/// is found. Constructed bird's-eye evidence in the default camera's metric view (0.05 m/px, 481 × 717, camera column
/// 240, 16 windows of 44.8 rows).
/// Source: the plausible lane width of issue 14 (2.5–4.5 m, i.e. 50–90 px at 0.05 m/px); boundaries of one road are
/// a whole number of lane widths apart (common practice); a 3.5 m lane is 70 px wide in this view (hand-worked in
/// <see cref="MetricBirdsEyeViewTests"/>).
/// </summary>
public sealed class MetricLaneSpanTests
{
    /// <summary>One 3.5 m dash (rows 590–659): it lies in two windows only, too few for a fit of its own (three).</summary>
    private static void OneDash(Mat view, int x) => Cv2.Rectangle(view, new Rect(x - 2, 590, 5, 70), Scalar.All(255), -1);

    [Fact]
    public void OuterBoundariesThreeLanesApart_AreMinusTwoAndPlusTwo_AndTheVeiledEgoBoundariesAreFound()
    {
        // 3.5 m lanes, camera centred: edge lines at ±5.25 m (columns 135, 345), one dash of each ego boundary at
        // ±1.75 m (205, 275). The 10.5 m between the edge lines is three lane widths of 3.5 m (no single lane is
        // wider than 4.5 m), so they are −2 and +2, and the ego boundaries are searched between them.
        SortedDictionary<int, double> lanes = Search(view =>
        {
            Solid(view, 135);
            Solid(view, 345);
            OneDash(view, 205);
            OneDash(view, 275);
        });
        Assert.Equal(new[] { -2, -1, 1, 2 }, lanes.Keys.ToArray());
        Assert.Equal(135, lanes[-2], 0);
        Assert.Equal(205, lanes[-1], 0);
        Assert.Equal(275, lanes[1], 0);
        Assert.Equal(345, lanes[2], 0);
    }

    [Fact]
    public void OuterBoundariesTwoLanesApart_AreMinusOneAndPlusTwo_OnTheSideOfTheirMidpoint()
    {
        // −1 solid at −1.75 m (205), +2 solid at +5.25 m (345): 7 m, two lanes of 3.5 m whose middle (275) is right
        // of the camera, so the unseen boundary is +1; one dash of it is there.
        SortedDictionary<int, double> lanes = Search(view =>
        {
            Solid(view, 205);
            Solid(view, 345);
            OneDash(view, 275);
        });
        Assert.Equal(new[] { -1, 1, 2 }, lanes.Keys.ToArray());
        Assert.Equal(205, lanes[-1], 0);
        Assert.Equal(275, lanes[1], 0);
        Assert.Equal(345, lanes[2], 0);
    }

    [Fact]
    public void WithNothingBetweenThem_TheWideReadingIsUndone_AndTheUsualOneKept()
    {
        // The same edge lines with no paint between them: nothing confirms three lanes, so the usual reading stands
        // (an implausibly wide ego lane keeps one boundary, the left one on equal confidence) and no lane is invented.
        SortedDictionary<int, double> lanes = Search(view =>
        {
            Solid(view, 135);
            Solid(view, 345);
        });
        Assert.Equal(new[] { -1 }, lanes.Keys.ToArray());
        Assert.Equal(135, lanes[-1], 0);
    }

    [Fact]
    public void TwoBoundariesOnOneSide_TheNearestMoreThanALaneWidthFromTheCamera_IsMinusTwo()
    {
        // Only the left side seen: solids at −5.25 m (135) and −8.75 m (65), 70 px (one 3.5 m lane) apart. The nearer
        // one is 105 px (1.5 lane widths) from the camera's column: the camera is not in the lane it bounds, so it is
        // −2 (the ego boundary between unseen) and the outer one −3, which the default four boundaries do not report.
        // Source: an ego boundary lies within one lane width of the camera, which is inside the lane it bounds (common practice).
        SortedDictionary<int, double> lanes = Search(view =>
        {
            Solid(view, 135);
            Solid(view, 65);
        });
        Assert.Equal(new[] { -2 }, lanes.Keys.ToArray());
        Assert.Equal(135, lanes[-2], 0);
    }

    [Fact]
    public void TwoBoundariesOnOneSide_TheNearestWithinALaneWidth_StaysMinusOne()
    {
        // Control: solids at −1.75 m (205) and −5.25 m (135); the nearer one is half a lane width from the camera.
        // Source: as above (common practice).
        SortedDictionary<int, double> lanes = Search(view =>
        {
            Solid(view, 205);
            Solid(view, 135);
        });
        Assert.Equal(new[] { -2, -1 }, lanes.Keys.ToArray());
        Assert.Equal(205, lanes[-1], 0);
        Assert.Equal(135, lanes[-2], 0);
    }
}
