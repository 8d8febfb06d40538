using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>What stage <c>warp</c> writes: the evidence in the bird's-eye view. Owns that <see cref="Mat"/>.</summary>
public sealed class WarpSection : IDisposable
{
    private readonly Mat birdsEye = new Mat();

    internal WarpSection(int birdsEyeWidth, int birdsEyeHeight)
    {
        BirdsEyeWidth = birdsEyeWidth;
        BirdsEyeHeight = birdsEyeHeight;
        birdsEye.Create(birdsEyeHeight, birdsEyeWidth, MatType.CV_8UC1);
    }

    /// <summary>Bird's-eye width in pixels.</summary>
    public int BirdsEyeWidth { get; }

    /// <summary>Bird's-eye height in pixels.</summary>
    public int BirdsEyeHeight { get; }

    /// <summary>Ground size of one bird's-eye pixel in metres when the view is metric (a camera file), else 0.</summary>
    public double MetresPerPixel { get; internal set; }

    /// <summary>Smallest plausible lane width in metres (used only when <see cref="MetresPerPixel"/> is above 0).</summary>
    public double MinLaneWidthM { get; internal set; }

    /// <summary>Largest plausible lane width in metres (used only when <see cref="MetresPerPixel"/> is above 0).</summary>
    public double MaxLaneWidthM { get; internal set; }

    /// <summary>Evidence warped to the bird's-eye view.</summary>
    public Mat BirdsEye => birdsEye;

    internal IEnumerable<Mat> OwnedBuffers => [birdsEye];

    /// <inheritdoc />
    public void Dispose() => birdsEye.Dispose();
}
