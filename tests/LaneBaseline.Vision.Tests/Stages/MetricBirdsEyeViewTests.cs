using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages.Search;
using LaneBaseline.Vision.Synthetic;
using LaneBaseline.Vision.Tests.Synthetic;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>With a camera the pipeline's bird's-eye view is metric: the region stage warps with the camera's ground homography.</summary>
public sealed class MetricBirdsEyeViewTests
{
    private static CameraModel Level(int width, int height, double f) => new()
    {
        ImageWidth = width,
        ImageHeight = height,
        Fx = f,
        Fy = f,
        Cx = width / 2.0,
        Cy = height / 2.0,
        MountHeightM = 1.5,
        PitchDeg = 0,
    };

    private static (FrameWorkspace Ws, FrameResult Result) Run(LanePipeline pipeline, Mat frame)
    {
        FrameResult r = pipeline.Process(frame, 0);
        return (pipeline.Workspace!, r);
    }

    // Source: pinhole camera (Hartley & Zisserman, Multiple View Geometry, 2nd ed., 2004, Sec. 6.1) and the
    // ground-plane-to-image homography it induces (ibid. Sec. 8.1), hand-worked. Level camera 1.5 m high, f = 1000 px,
    // principal point (640, 360): a ground point X ahead, Y left images at u = 640 − f·Y/X, v = 360 + f·1.5/X.
    // Ground (10, ±1.75) → (465, 510) and (815, 510). The bottom row v = 719 sees X = 1500/359 = 4.178273 m (the
    // view's near edge). Metric view 0.05 m/px, ±12 m, 40 m far: width round(24/0.05) + 1 = 481 (centre column 240),
    // height round((40 − 4.178273)/0.05) + 1 = 717; x = 240 − Y/0.05, y = 716 − (X − 4.178273)/0.05, so
    // (10, 1.75) → (205, 599.56546) and (10, −1.75) → (275, 599.56546): a 3.5 m lane is 70 px wide.
    // The 640 × 360 camera with f = 500 sees the same ground at half the pixels and is processed enlarged to the
    // 1280 working width: near edge 750/179 = 4.189944 m, height round(716.2011) + 1 = 717, y = 716 − 116.20112 = 599.79888.
    [Theory]
    [InlineData(1280, 720, 1000, 465, 815, 510, 599.56546)]
    [InlineData(640, 360, 500, 232.5, 407.5, 255, 599.79888)]
    public void CameraRun_WarpsToTheMetricView_HandWorkedPinhole(int w, int h, double f, double uLeft, double uRight, double v, double expectedY)
    {
        CameraModel cam = Level(w, h, f);
        using var pipeline = new LanePipeline(new PipelineOptions(), cam.ProjectGroundToImage(1e7, 0), cam);
        using var frame = new Mat(h, w, MatType.CV_8UC3, Scalar.All(90));
        (FrameWorkspace ws, _) = Run(pipeline, frame);

        Assert.Equal(481, ws.Warp.BirdsEyeWidth);
        Assert.Equal(717, ws.Warp.BirdsEyeHeight);
        Assert.Equal(0.05, ws.Warp.MetresPerPixel);
        foreach ((double u, double expectedX) in new[] { (uLeft, 205.0), (uRight, 275.0) })
        {
            (double xw, double yw) = ws.Scaling.ToWorking(u, v);
            Assert.True(ws.Region.ImageToBirdsEye.TryMap(xw, yw, out double x, out double y));
            Assert.Equal(expectedX, x, 3);
            Assert.Equal(expectedY, y, 3);
        }
    }

    [Fact]
    public void WithoutCamera_TheViewKeepsThePresetSize_AndIsNotMetric()
    {
        // Source: configs/README.md (warp.widthPx 480, warp.heightPx 320), the documented behaviour without a camera.
        using var pipeline = new LanePipeline(new PipelineOptions());
        using var frame = new Mat(720, 1280, MatType.CV_8UC3, Scalar.All(90));
        (FrameWorkspace ws, _) = Run(pipeline, frame);
        Assert.Equal(480, ws.Warp.BirdsEyeWidth);
        Assert.Equal(320, ws.Warp.BirdsEyeHeight);
        Assert.Equal(0, ws.Warp.MetresPerPixel);
        Assert.Equal((0.12 * 480, 0.5 * 480), LaneWidthLimits.Of(new SearchOptions(), ws));
    }

    [Fact]
    public void MetricOff_KeepsTheTrapezoid_EvenWithACamera()
    {
        // Source: docs/detect.md, "With a camera file": metric.metresPerPx 0 keeps the vanishing-point trapezoid.
        CameraModel cam = CameraModel.CreateDefault(1280, 720);
        var options = new PipelineOptions { Metric = new MetricViewOptions { MetresPerPx = 0 } };
        using var pipeline = new LanePipeline(options, cam.ProjectGroundToImage(1e7, 0), cam);
        using var frame = new Mat(720, 1280, MatType.CV_8UC3, Scalar.All(90));
        (FrameWorkspace ws, _) = Run(pipeline, frame);
        Assert.Equal(480, ws.Warp.BirdsEyeWidth);
        Assert.Equal(0, ws.Warp.MetresPerPixel);
    }

    [Theory]
    [InlineData(0.05, 50, 90)]
    [InlineData(0.04, 62.5, 112.5)]
    public void LaneWidthLimits_AreTheMetreLimitsOverTheScale(double s, double minPx, double maxPx)
    {
        // Source: the plausible lane width of issue 14 (2.5–4.5 m; lane widths of road design guides lie inside,
        // from memory about 2.7–3.7 m) divided by the view's metres per pixel: 2.5/0.05 = 50, 4.5/0.05 = 90,
        // 2.5/0.04 = 62.5, 4.5/0.04 = 112.5.
        CameraModel cam = CameraModel.CreateDefault(1280, 720);
        var options = new PipelineOptions { Metric = new MetricViewOptions { MetresPerPx = s, LateralHalfWidthM = 9 } };
        using var pipeline = new LanePipeline(options, cam.ProjectGroundToImage(1e7, 0), cam);
        using var frame = new Mat(720, 1280, MatType.CV_8UC3, Scalar.All(90));
        (FrameWorkspace ws, _) = Run(pipeline, frame);
        (double lo, double hi) = LaneWidthLimits.Of(new SearchOptions(), ws);
        Assert.Equal(minPx, lo, 9);
        Assert.Equal(maxPx, hi, 9);
    }

    // Source: the hand-worked pinhole check above fixes the view's geometry; here the renderer draws a straight road
    // of 3.5 m lanes (a typical lane width, from memory) through its default camera (1.5 m high, 2° pitch,
    // f = 1000 px), and the boundaries the pipeline finds must be 3.5 m / 0.05 m/px = 70 bird's-eye pixels apart
    // (within 4 px = 0.2 m: paint width and fit noise).
    [Fact]
    public void RenderedStraightRoad_BoundariesAreLaneWidthOverScaleApart()
    {
        CameraModel cam = SceneFixtures.Camera(1280, 720);
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        renderer.Render(SceneFixtures.Straight(KnownMarkingStandards.Europe, 3.5, 0.15, lanes: 3), 0, frame);
        using var pipeline = new LanePipeline(new PipelineOptions(), cam.ProjectGroundToImage(1e7, 0), cam);
        (FrameWorkspace ws, FrameResult result) = Run(pipeline, frame);

        // Bird's-eye column of each lane at the image row that sees the ground 12 m ahead.
        double row = cam.ProjectGroundToImage(12, 0).V;
        var columns = new SortedDictionary<int, double>();
        foreach (Lane lane in result.Lanes)
        {
            double x = XAtRow(lane, row);
            Assert.True(ws.Region.ImageToBirdsEye.TryMap(x, row, out double bx, out _));
            columns[lane.Slot!.Value] = bx;
        }

        Assert.True(columns.ContainsKey(-1) && columns.ContainsKey(1), "the ego lane's boundaries must be found");
        int[] slots = columns.Keys.ToArray();
        Assert.True(slots.Length >= 3, "at least one neighbouring boundary must be found");
        for (int i = 1; i < slots.Length; i++)
        {
            Assert.InRange(columns[slots[i]] - columns[slots[i - 1]], 66, 74);
        }
    }

    private static double XAtRow(Lane lane, double row)
    {
        for (int k = 1; k < lane.Points.Count; k++)
        {
            LanePoint a = lane.Points[k - 1], b = lane.Points[k];
            if ((a.Y - row) * (b.Y - row) <= 0 && a.Y != b.Y)
            {
                return a.X + ((b.X - a.X) * (row - a.Y) / (b.Y - a.Y));
            }
        }

        throw new InvalidOperationException("lane does not reach the row");
    }
}
