using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages.Search;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// Window centroids of the sliding-window search on constructed bird's-eye evidence (480x480, 16 windows of 30 rows,
/// windows ±14 px). Source: the centroid of a symmetric bar is its centre line (first moment of a uniform mass,
/// common practice); a blob that is not part of the bar must not move it (mode, not mean, of the column profile:
/// mean shift, Comaniciu &amp; Meer, IEEE TPAMI 24(5), 2002).
/// </summary>
public sealed class WindowSliderTests
{
    private static FrameWorkspace Workspace()
    {
        FrameWorkspace ws = new(640, 360, 480, 480, 100, 64, 0.5);
        ws.Warp.BirdsEye.SetTo(Scalar.All(0));
        ws.Search.CandidateCount = 1;
        ws.Search.CandidateX[0] = 201;
        ws.Color.RoadMedian = 120; // a lit road (daylight)
        return ws;
    }

    [Fact]
    public void AFlareBlobBesideTheMarking_DoesNotPullTheCentroid()
    {
        using FrameWorkspace ws = Workspace();

        // A vertical marking 4 px wide (columns 199..202, centre 200.5) over all rows, and a 6x20 blob whose columns
        // 208..213 start after 5 empty columns to its right, in the nearest window only (rows 455..474): a lens-flare rim.
        Cv2.Rectangle(ws.Warp.BirdsEye, new Rect(199, 0, 4, 480), Scalar.All(255), -1);
        Cv2.Rectangle(ws.Warp.BirdsEye, new Rect(208, 455, 6, 20), Scalar.All(255), -1);
        new WindowSlider(new SearchOptions { WindowCount = 16, WindowHalfWidthPx = 14 }).Slide(ws, 0);

        // The whole-window mean would be (4·30·200.5 + 6·20·210.5) / 240 = 205.5; the marking's centre is 200.5.
        SearchWindow nearest = ws.Search.CandidateWindows[0][0];
        Assert.Equal(200.5, nearest.X, 6);
        Assert.Equal(4 * 30, nearest.Mass, 6);
    }

    [Fact]
    public void TheTwoStrokesOfADoubleLine_StayOneCluster()
    {
        using FrameWorkspace ws = Workspace();

        // Two strokes 2 px wide with 2 empty columns between them (196..197 and 200..201): centre 198.5.
        Cv2.Rectangle(ws.Warp.BirdsEye, new Rect(196, 0, 2, 480), Scalar.All(255), -1);
        Cv2.Rectangle(ws.Warp.BirdsEye, new Rect(200, 0, 2, 480), Scalar.All(255), -1);
        new WindowSlider(new SearchOptions { WindowCount = 16, WindowHalfWidthPx = 14 }).Slide(ws, 0);

        SearchWindow nearest = ws.Search.CandidateWindows[0][0];
        Assert.Equal(198.5, nearest.X, 6);
        Assert.Equal(4 * 30, nearest.Mass, 6);
    }

    [Fact]
    public void NearestCluster_KeepsTheRunAtThePredictedCentre_NotTheHeavierOne()
    {
        // Column masses (x0 = 10): a light run at columns 10..11, six empty columns, a heavy run at 18..20. Predicted
        // centre 11: the light run is followed; predicted centre 19: the heavy one.
        double[] mass = [5, 5, 0, 0, 0, 0, 0, 0, 9, 9, 9];
        double[] ySum = [50, 50, 0, 0, 0, 0, 0, 0, 90, 90, 90];
        (double m, double sx, double sy) = WindowSlider.NearestCluster(mass, ySum, 10, 11);
        Assert.Equal(10, m, 9);
        Assert.Equal(10.5, sx / m, 9);
        Assert.Equal(10, sy / m, 9);
        (m, sx, _) = WindowSlider.NearestCluster(mass, ySum, 10, 19);
        Assert.Equal(27, m, 9);
        Assert.Equal(19, sx / m, 9);
    }

    [Fact]
    public void OnADarkRoad_TheWholeWindowCentroidIsKept()
    {
        using FrameWorkspace ws = Workspace();
        ws.Color.RoadMedian = 40;

        // The flare case above on a dark road: the whole-window mean (4·30·200.5 + 6·20·210.5) / 240 = 205.5.
        Cv2.Rectangle(ws.Warp.BirdsEye, new Rect(199, 0, 4, 480), Scalar.All(255), -1);
        Cv2.Rectangle(ws.Warp.BirdsEye, new Rect(208, 455, 6, 20), Scalar.All(255), -1);
        new WindowSlider(new SearchOptions { WindowCount = 16, WindowHalfWidthPx = 14 }).Slide(ws, 0);
        Assert.Equal(205.5, ws.Search.CandidateWindows[0][0].X, 6);
    }
}
