using System.Diagnostics;
using OpenCvSharp;

namespace LaneBaseline.Cli.Commands;

/// <summary>
/// Times the bare OpenCV primitives the pipeline's cost is compared with: converting the full frame to HLS and
/// warping the full frame with a perspective transform (the work a naive bird's-eye pipeline does per frame).
/// </summary>
internal sealed class PrimitiveTimer : IDisposable
{
    private readonly Mat hls = new Mat();
    private readonly Mat warped = new Mat();
    private readonly Mat transform = new Mat(3, 3, MatType.CV_64FC1, Scalar.All(0));

    public PrimitiveTimer()
    {
        // A mild keystone homography (any non-affine transform costs the same per output pixel).
        transform.Set(0, 0, 1.0); transform.Set(0, 1, 0.2); transform.Set(1, 1, 1.1); transform.Set(2, 1, 0.0004); transform.Set(2, 2, 1.0);
    }

    /// <summary>Milliseconds of the HLS conversion and of the warp of <paramref name="frame"/>.</summary>
    public (double Hls, double Warp) Measure(Mat frame)
    {
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
        transform.Dispose();
    }
}
