using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages;
using LaneBaseline.Vision.Stages.Search;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// Slots in the vanishing-point trapezoid (no camera file) when a low sun veils the ego lane's dashes: on a veiled
/// road the nearest boundaries left and right may be two or three lane widths apart, and are read so only when a
/// boundary between them is measured in the near half. Constructed bird's-eye evidence in the default trapezoid view
/// (480 × 320, camera column 239.5, 16 windows of 20 rows, smallest plausible lane width 0.12 × 480 = 57.6 px).
/// Source: boundaries of one road are a whole number of lane widths apart, and the camera lies inside the lane its
/// ego boundaries bound (common practice); a road whose median lightness is at least color.claheMinVeilLightness (150)
/// is veiled (the preset's definition, docs/detect.md "Illumination and evidence").
/// </summary>
public sealed class TrapezoidLaneSpanTests
{
    /// <summary>
    /// Runs the pipeline without a camera on a uniform frame of grey <paramref name="grey"/> (200: a veiled road; 90: a
    /// plain one), replaces the bird's-eye evidence by what <paramref name="draw"/> paints and runs the search stage
    /// again; returns (slot, bottom-row column) of each lane.
    /// </summary>
    private static SortedDictionary<int, double> Search(int grey, Action<Mat> draw)
    {
        using var pipeline = new LanePipeline(new PipelineOptions());
        using var frame = new Mat(720, 1280, MatType.CV_8UC3, Scalar.All(grey));
        pipeline.Process(frame, 0);
        FrameWorkspace ws = pipeline.Workspace!;
        Assert.Equal(0, ws.Warp.MetresPerPixel);
        Assert.Equal(480, ws.Warp.BirdsEyeWidth);
        Assert.Equal(320, ws.Warp.BirdsEyeHeight);
        Assert.Equal(grey >= 150, ws.Color.Veiled);
        return MetricBirdsEyeSearch.SearchOn(ws, draw);
    }

    private static void Solid(Mat view, int x) => MetricBirdsEyeSearch.Solid(view, x);

    /// <summary>One dash over rows <paramref name="top"/>..top+37: two windows of 20 rows, too few for a fit of its own (three).</summary>
    private static void Dash(Mat view, int x, int top) => Cv2.Rectangle(view, new Rect(x - 2, top, 5, 38), Scalar.All(255), -1);

    /// <summary>Lanes of 75 px around the camera: outer lines at 127 and 352, ego boundaries at 202 and 277.</summary>
    private static void ThreeLanes(Mat view, int dashTop)
    {
        Solid(view, 127);
        Solid(view, 352);
        Dash(view, 202, dashTop);
        Dash(view, 277, dashTop);
    }

    [Fact]
    public void VeiledRoad_OuterLinesThreeLanesApart_AreMinusTwoAndPlusTwo_AndTheEgoDashesAreFound()
    {
        // 225 px between the outer lines: a plausible single lane (at most 0.5 × 480 = 240 px), but also three of 75 px
        // with the camera (239.5) in the middle one. One near dash of each ego boundary (rows 261–298) confirms three.
        SortedDictionary<int, double> lanes = Search(200, view => ThreeLanes(view, 261));
        Assert.Equal(new[] { -2, -1, 1, 2 }, lanes.Keys.ToArray());
        Assert.Equal(127, lanes[-2], 0);
        Assert.Equal(202, lanes[-1], 0);
        Assert.Equal(277, lanes[1], 0);
        Assert.Equal(352, lanes[2], 0);
    }

    [Fact]
    public void PlainRoad_SameEvidence_KeepsTheUsualReading()
    {
        // Not veiled: the outer lines are read as the ego lane, as before; the two-window dashes are not fitted.
        SortedDictionary<int, double> lanes = Search(90, view => ThreeLanes(view, 261));
        Assert.Equal(new[] { -1, 1 }, lanes.Keys.ToArray());
        Assert.Equal(127, lanes[-1], 0);
        Assert.Equal(352, lanes[1], 0);
    }

    [Fact]
    public void VeiledRoad_DashesOnlyInTheFarHalf_DoNotConfirm()
    {
        // The same dashes in the far half (rows 61–98): no near measurement, so the wide reading is undone.
        SortedDictionary<int, double> lanes = Search(200, view => ThreeLanes(view, 61));
        Assert.Equal(new[] { -1, 1 }, lanes.Keys.ToArray());
        Assert.Equal(127, lanes[-1], 0);
        Assert.Equal(352, lanes[1], 0);
    }

    [Fact]
    public void VeiledRoad_NothingBetween_InventsNoLane()
    {
        SortedDictionary<int, double> lanes = Search(200, view =>
        {
            Solid(view, 127);
            Solid(view, 352);
        });
        Assert.Equal(new[] { -1, 1 }, lanes.Keys.ToArray());
    }

    [Theory]
    [InlineData(202, 277, 0)] // one 75 px lane: half of it (37.5) is below 57.6
    [InlineData(127, 352, 3)] // 225 px, camera in the middle third (202–277)
    [InlineData(127, 277, 2)] // 150 px, camera right of the middle third's reach: two lanes of 75
    [InlineData(100, 214, 0)] // 114 px: half (57) is just below the smallest width
    public void TrapezoidSpan_CountsWholeLanesOfAtLeastTheSmallestWidth(double xl, double xr, int expected)
    {
        Assert.Equal(expected, SlotAssigner.TrapezoidSpan(xl, xr, 239.5, 57.6));
    }
}
