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

    /// <summary>Evidence warped to the bird's-eye view.</summary>
    public Mat BirdsEye => birdsEye;

    internal IEnumerable<Mat> OwnedBuffers => [birdsEye];

    /// <inheritdoc />
    public void Dispose() => birdsEye.Dispose();
}
