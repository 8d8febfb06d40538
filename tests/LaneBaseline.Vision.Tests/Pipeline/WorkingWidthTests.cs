using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Pipeline;

// limits.workingWidthPx: narrow frames are enlarged before the stages and positions are mapped back to the frame's
// own pixels. Reference: OpenCV's own bilinear resize (the same call the resize stage makes), whose pixel-centre
// convention the mapping must follow.
public sealed class WorkingWidthTests
{
    [Fact]
    public void NarrowFrame_IsEnlarged_AndAWorkingPositionMapsBackToItsFramePixel()
    {
        // 500x281 has no whole-number ratio to 1280: x and y scale by 1280/500 and 719/281.
        using var frame = new Mat(281, 500, MatType.CV_8UC3, Scalar.All(40));
        frame.Set(200, 100, new Vec3b(255, 255, 255)); // one bright pixel at frame (100, 200)
        using var pipeline = new LanePipeline(new PipelineOptions());
        pipeline.Process(frame, 0);
        FrameWorkspace ws = pipeline.Workspace!;
        Assert.True(ws.Enlarged);
        Assert.Equal((1280, 719), (ws.Width, ws.Height));
        Assert.Equal((500, 281), (ws.FrameWidth, ws.FrameHeight));
        Assert.Equal(["resize", "gradient", "hough", "region", "color", "warp", "search", "marking"], pipeline.StageNames);

        // The brightest pixel of OpenCV's enlargement (the workspace's frame) maps back to the bright frame pixel.
        using Mat grey = new();
        Cv2.CvtColor(ws.Frame, grey, ColorConversionCodes.BGR2GRAY);
        Cv2.MinMaxLoc(grey, out _, out _, out _, out Point brightest);
        (double x, double y) = ws.ToFramePixels(brightest.X, brightest.Y);
        Assert.InRange(x, 99.5, 100.5);
        Assert.InRange(y, 199.5, 200.5);

        // Exact inverse of the pixel-centre mapping, and clamping to the frame.
        (x, y) = ws.ToFramePixels(((100 + 0.5) * 1280 / 500.0) - 0.5, ((200 + 0.5) * 719 / 281.0) - 0.5);
        Assert.Equal(100, x, 9);
        Assert.Equal(200, y, 9);
        Assert.Equal((499.0, 280.0), ws.ToFramePixels(1279.9, 718.9));
    }

    [Fact]
    public void WideFrame_OrWorkingWidthOff_IsProcessedAtItsOwnSize()
    {
        using var frame = new Mat(360, 640, MatType.CV_8UC3, Scalar.All(40));
        using var off = new LanePipeline(new PipelineOptions { Limits = new LimitsOptions { WorkingWidthPx = 0 } });
        off.Process(frame, 0);
        Assert.False(off.Workspace!.Enlarged);
        Assert.Equal((640, 360), (off.Workspace.Width, off.Workspace.Height));
        Assert.Equal((12.25, 7.5), off.Workspace.ToFramePixels(12.25, 7.5));

        using var narrow = new LanePipeline(new PipelineOptions { Limits = new LimitsOptions { WorkingWidthPx = 600 } });
        narrow.Process(frame, 0);
        Assert.False(narrow.Workspace!.Enlarged); // 640 is already wider than 600
        Assert.DoesNotContain("resize", narrow.StageNames);

        // Enlargement stops at 4x (LanePipeline.MaxEnlargement): a 160x120 frame is processed at 640x480, not 1280.
        using var tiny = new Mat(120, 160, MatType.CV_8UC3, Scalar.All(40));
        using var capped = new LanePipeline(new PipelineOptions());
        capped.Process(tiny, 0);
        Assert.Equal((640, 480), (capped.Workspace!.Width, capped.Workspace.Height));
    }
}
