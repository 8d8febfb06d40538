using LaneBaseline.Core.Results;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>
/// What stage <c>region</c> writes: the vanishing point, the warped trapezoid and the homographies between the image
/// and the bird's-eye view. Owns the 3x3 homography <see cref="Mat"/> handed to OpenCV's warp.
/// </summary>
public sealed class RegionSection : IDisposable
{
    private readonly Mat homographyMat = new Mat(3, 3, MatType.CV_64FC1, Scalar.All(0));

    internal RegionSection()
    {
    }

    /// <summary>Vanishing-point column, image pixels.</summary>
    public double VanishingX { get; internal set; }

    /// <summary>Vanishing-point row (horizon), image pixels.</summary>
    public double VanishingY { get; internal set; }

    /// <summary>Where the vanishing point came from.</summary>
    public VanishingSource VanishingSource { get; internal set; }

    internal bool HasPreviousVanishing { get; set; }

    /// <summary>Image row of the far edge of the warped trapezoid.</summary>
    public double RoiTop { get; internal set; }

    /// <summary>Corners of the warped trapezoid in image pixels: top-left, top-right, bottom-right, bottom-left (x, y pairs).</summary>
    internal double[] Trapezoid { get; } = new double[8];

    internal PlaneHomography ImageToBirdsEye { get; set; }

    internal PlaneHomography BirdsEyeToImage { get; set; }

    internal Mat HomographyMat => homographyMat;

    internal IEnumerable<Mat> OwnedBuffers => [homographyMat];

    /// <inheritdoc />
    public void Dispose() => homographyMat.Dispose();
}
