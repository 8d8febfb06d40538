using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>
/// What stage <c>gradient</c> writes (grey image, blurred band, Canny edges) and the later stages read. The section
/// owns its <see cref="Mat"/>s; everyone else borrows them until the next frame.
/// </summary>
public sealed class GradientSection : IDisposable
{
    private readonly Mat gray = new Mat();
    private readonly Mat blurred = new Mat();
    private readonly Mat small = new Mat();
    private readonly Mat edges = new Mat();
    private readonly FrameWorkspace owner;
    private bool grayAboveBand;

    internal GradientSection(FrameWorkspace owner, int width, int height, int bandTop, double edgeScale)
    {
        this.owner = owner;
        gray.Create(height, width, MatType.CV_8UC1);
        blurred.Create(height - bandTop, width, MatType.CV_8UC1);
        EdgeScale = edgeScale;
        EdgeSize = new Size(Math.Max(8, (int)Math.Round(width * edgeScale)), Math.Max(8, (int)Math.Round((height - bandTop) * edgeScale)));
        small.Create(EdgeSize, MatType.CV_8UC1);
        edges.Create(EdgeSize, MatType.CV_8UC1);
    }

    /// <summary>Grey image of the frame (0.299 R + 0.587 G + 0.114 B). The gradient stage converts only the band
    /// (rows <see cref="FrameWorkspace.BandTop"/> and below); the rows above are converted on first use in the frame.</summary>
    public Mat Gray
    {
        get
        {
            int bandTop = owner.BandTop;
            if (!grayAboveBand && bandTop > 0)
            {
                using Mat source = owner.Frame.RowRange(0, bandTop);
                using Mat rows = gray.RowRange(0, bandTop);
                Cv2.CvtColor(source, rows, ColorConversionCodes.BGR2GRAY);
            }

            grayAboveBand = true;
            return gray;
        }
    }

    /// <summary>The grey buffer as the gradient stage fills it (band rows only, until <see cref="Gray"/> completes it).</summary>
    internal Mat GrayBand => gray;

    /// <summary>Whether the grey rows above the band belong to the current frame.</summary>
    internal bool GrayAboveBandCurrent { set => grayAboveBand = value; }

    /// <summary>Blurred grey band (rows <see cref="FrameWorkspace.BandTop"/> and below).</summary>
    public Mat Blurred => blurred;

    /// <summary>Scale of <see cref="Edges"/> relative to the frame (hough.imageScale).</summary>
    public double EdgeScale { get; }

    /// <summary>Size of <see cref="Edges"/> in pixels.</summary>
    public Size EdgeSize { get; }

    /// <summary>The blurred band resized to <see cref="EdgeSize"/>.</summary>
    internal Mat SmallBand => small;

    /// <summary>Canny edges of the band at <see cref="EdgeScale"/>.</summary>
    public Mat Edges => edges;

    internal IEnumerable<Mat> OwnedBuffers => [gray, blurred, small, edges];

    /// <inheritdoc />
    public void Dispose()
    {
        gray.Dispose();
        blurred.Dispose();
        edges.Dispose();
        small.Dispose();
    }
}
