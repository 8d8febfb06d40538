using System.Diagnostics;
using OpenCvSharp;

namespace LaneBaseline.Cli.Bench;

/// <summary>
/// The "floor" the pipeline's cost is compared with: the bare OpenCV primitives a bird's-eye colour pipeline cannot
/// avoid, run on the whole frame with no logic around them: converting the full frame to HLS (the colour space of
/// the paint thresholds) and warping the full frame with a perspective transform (the bird's-eye view). Frames
/// narrower than the pipeline's working width (<c>limits.workingWidthPx</c>) are measured at that width, as the
/// pipeline processes them (the enlargement itself is not timed here; the pipeline shows it as its resize stage).
/// One instance per worker; its buffers are reused for every frame.
/// </summary>
internal sealed class FloorPrimitives : IDisposable
{
    private readonly Mat hls = new Mat();
    private readonly Mat warped = new Mat();
    private readonly Mat transform = new Mat(3, 3, MatType.CV_64FC1, Scalar.All(0));
    private readonly Mat enlarged = new Mat();
    private readonly int workingWidth;

    public FloorPrimitives(int workingWidth = 0)
    {
        this.workingWidth = workingWidth;
        // A mild keystone homography (any non-affine transform costs the same per output pixel).
        transform.Set(0, 0, 1.0);
        transform.Set(0, 1, 0.2);
        transform.Set(1, 1, 1.1);
        transform.Set(2, 1, 0.0004);
        transform.Set(2, 2, 1.0);
    }

    /// <summary>Names of the primitives, in the order <see cref="Measure"/> returns them.</summary>
    public static IReadOnlyList<string> Names { get; } = ["BGR->HLS full frame", "warp full frame"];

    /// <summary>Milliseconds of the HLS conversion and of the warp of <paramref name="frame"/> (8-bit BGR, borrowed).</summary>
    public (double Hls, double Warp) Measure(Mat frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        (int w, int h) = Vision.Pipeline.LanePipeline.WorkingSize(frame.Cols, frame.Rows, workingWidth);
        if (w != frame.Cols)
        {
            Cv2.Resize(frame, enlarged, new Size(w, h), 0, 0, InterpolationFlags.Linear);
            frame = enlarged;
        }

        long t0 = Stopwatch.GetTimestamp();
        Cv2.CvtColor(frame, hls, ColorConversionCodes.BGR2HLS);
        double a = Stopwatch.GetElapsedTime(t0).TotalMilliseconds;
        t0 = Stopwatch.GetTimestamp();
        Cv2.WarpPerspective(frame, warped, transform, frame.Size(), InterpolationFlags.Linear);
        double b = Stopwatch.GetElapsedTime(t0).TotalMilliseconds;
        return (a, b);
    }

    public void Dispose()
    {
        hls.Dispose();
        warped.Dispose();
        enlarged.Dispose();
        transform.Dispose();
    }
}
