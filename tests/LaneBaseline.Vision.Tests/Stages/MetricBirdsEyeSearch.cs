using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// The search stage alone on constructed bird's-eye evidence in the default camera's metric view (0.05 m/px,
/// 481 × 717, camera column 240, 16 windows of 44.8 rows), shared by the slot tests; <see cref="SearchOn"/> serves any view.
/// </summary>
internal static class MetricBirdsEyeSearch
{
    /// <summary>Runs the search stage on the evidence <paramref name="draw"/> paints; returns (slot, bottom-row column) of each lane.</summary>
    public static SortedDictionary<int, double> Search(Action<Mat> draw)
    {
        CameraModel cam = CameraModel.CreateDefault(1280, 720);
        using var pipeline = new LanePipeline(new PipelineOptions(), cam.ProjectGroundToImage(1e7, 0), cam);
        using var frame = new Mat(720, 1280, MatType.CV_8UC3, Scalar.All(90));
        pipeline.Process(frame, 0);
        FrameWorkspace ws = pipeline.Workspace!;
        Assert.Equal(0.05, ws.Warp.MetresPerPixel);
        Assert.Equal(481, ws.Warp.BirdsEyeWidth);
        return SearchOn(ws, draw);
    }

    /// <summary>Replaces the bird's-eye evidence of a processed frame by what <paramref name="draw"/> paints, runs the search stage again; returns (slot, bottom-row column) of each lane.</summary>
    public static SortedDictionary<int, double> SearchOn(FrameWorkspace ws, Action<Mat> draw)
    {
        ws.Warp.BirdsEye.SetTo(Scalar.All(0));
        draw(ws.Warp.BirdsEye);
        using var stage = new SlidingWindowFitStage(new SearchOptions(), new FitOptions(), new ConfidenceOptions());
        stage.Process(ws);
        var lanes = new SortedDictionary<int, double>();
        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate e = ws.GetLane(i);
            lanes[e.Slot] = e.Fit.At(ws.Warp.BirdsEyeHeight - 1);
        }

        return lanes;
    }

    /// <summary>A solid 5 px line over every row at column <paramref name="x"/>.</summary>
    public static void Solid(Mat view, int x) => Cv2.Rectangle(view, new Rect(x - 2, 0, 5, view.Rows), Scalar.All(255), -1);
}
