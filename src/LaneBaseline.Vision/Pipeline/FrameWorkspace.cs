using LaneBaseline.Core.Results;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The per-stream buffers the stages share: built once for a frame size, reused for every frame. Every
/// <see cref="Mat"/> here is owned by the workspace and disposed with it; stages and callers only borrow them
/// until the next frame. Coordinates: pixel (x, y), origin top-left, y down; bird's-eye buffers likewise.
/// </summary>
public sealed class FrameWorkspace : IDisposable
{
    /// <summary>Most points written per lane.</summary>
    public const int MaxPointsPerLane = 256;

    /// <summary>Most lanes per frame (slots −3 to +3 without 0).</summary>
    public const int MaxLanes = 6;

    internal const int MaxCandidates = 12;
    internal const int MaxWindows = 64;

    private readonly Mat gray = new Mat();
    private readonly Mat blurred = new Mat();
    private readonly Mat edges = new Mat();
    private readonly Mat small = new Mat();
    private readonly Mat evidence = new Mat();
    private readonly Mat birdsEye = new Mat();
    private bool grayAboveBand;
    private readonly Mat homographyMat = new Mat(3, 3, MatType.CV_64FC1, Scalar.All(0));

    internal FrameWorkspace(int width, int height, int birdsEyeWidth, int birdsEyeHeight, int bandTop, int maxSegments, double edgeScale)
    {
        Width = width;
        Height = height;
        BirdsEyeWidth = birdsEyeWidth;
        BirdsEyeHeight = birdsEyeHeight;
        BandTop = bandTop;
        gray.Create(height, width, MatType.CV_8UC1);
        blurred.Create(height - bandTop, width, MatType.CV_8UC1);
        EdgeScale = edgeScale;
        EdgeSize = new Size(Math.Max(8, (int)Math.Round(width * edgeScale)), Math.Max(8, (int)Math.Round((height - bandTop) * edgeScale)));
        small.Create(EdgeSize, MatType.CV_8UC1);
        edges.Create(EdgeSize, MatType.CV_8UC1);
        evidence.Create(height, width, MatType.CV_8UC1);
        birdsEye.Create(birdsEyeHeight, birdsEyeWidth, MatType.CV_8UC1);
        Segments = new HoughSegment[Math.Max(maxSegments, 4)];
        Prefix = new int[width + 1];
        LightRow = new int[width];
        ColumnMass = new double[birdsEyeWidth];
        Smoothed = new double[birdsEyeWidth];
        CandidateX = new double[MaxCandidates];
        CandidateMass = new double[MaxCandidates];
        CandidateWindows = new SearchWindow[MaxCandidates][];
        CandidateFits = new LaneEstimate[MaxCandidates];
        CandidateTopY = new double[MaxCandidates];
        for (int i = 0; i < MaxCandidates; i++)
        {
            CandidateWindows[i] = new SearchWindow[MaxWindows];
        }

        LanePoints = new double[MaxLanes][];
        for (int i = 0; i < MaxLanes; i++)
        {
            LanePoints[i] = new double[2 * MaxPointsPerLane];
        }

        Lanes = new LaneEstimate[MaxLanes];
        LaneCandidate = new int[MaxLanes];
        FitX = new double[MaxWindows];
        FitY = new double[MaxWindows];
        FitW = new double[MaxWindows];
        FitUse = new bool[MaxWindows];
        FitBest = new bool[MaxWindows];
    }

    /// <summary>Working width in pixels (the frame's own width unless <c>limits.workingWidthPx</c> enlarged it).</summary>
    public int Width { get; }

    /// <summary>The mapping between the caller's frame pixels and working pixels.</summary>
    public WorkingScale Scaling { get; internal set; }

    /// <summary>Working columns per frame column (<see cref="WorkingScale.X"/>).</summary>
    public double Scale => Scaling.X;

    /// <summary>Working rows per frame row (<see cref="WorkingScale.Y"/>).</summary>
    public double ScaleY => Scaling.Y;

    /// <summary>Whether the frames are processed enlarged (the working size differs from the frame's).</summary>
    public bool Enlarged => Scaling.Enlarged;

    /// <summary>Width of the caller's frames, in their own pixels.</summary>
    public int FrameWidth => Scaling.FrameWidth;

    /// <summary>Height of the caller's frames, in their own pixels.</summary>
    public int FrameHeight => Scaling.FrameHeight;

    /// <summary>A working-pixel position in the frame's own pixels, clamped to the frame (<see cref="WorkingScale.ToFrameClamped"/>).</summary>
    public (double X, double Y) ToFramePixels(double x, double y) => Scaling.ToFrameClamped(x, y);

    /// <summary>Working height in pixels.</summary>
    public int Height { get; }

    /// <summary>Bird's-eye width in pixels.</summary>
    public int BirdsEyeWidth { get; }

    /// <summary>Bird's-eye height in pixels.</summary>
    public int BirdsEyeHeight { get; }

    /// <summary>First image row of the Hough search band.</summary>
    public int BandTop { get; }

    /// <summary>The current frame at the working size (8-bit BGR): the caller's frame, or the pipeline's enlarged copy; borrowed for one <c>Process</c> call.</summary>
    public Mat Frame { get; internal set; } = null!;

    /// <summary>Timestamp of the current frame, in seconds.</summary>
    public double TimestampSeconds { get; internal set; }

    /// <summary>Grey image of the frame (0.299 R + 0.587 G + 0.114 B). The gradient stage converts only the band
    /// (rows <see cref="BandTop"/> and below); the rows above are converted on first use in the frame.</summary>
    public Mat Gray
    {
        get
        {
            if (!grayAboveBand && BandTop > 0)
            {
                using Mat source = Frame.RowRange(0, BandTop);
                using Mat rows = gray.RowRange(0, BandTop);
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

    /// <summary>Blurred grey band (rows <see cref="BandTop"/> and below).</summary>
    public Mat Blurred => blurred;

    /// <summary>Scale of <see cref="Edges"/> relative to the frame (hough.imageScale).</summary>
    public double EdgeScale { get; }

    /// <summary>Size of <see cref="Edges"/> in pixels.</summary>
    public Size EdgeSize { get; }

    /// <summary>The blurred band resized to <see cref="EdgeSize"/>.</summary>
    internal Mat SmallBand => small;

    /// <summary>Canny edges of the band at <see cref="EdgeScale"/>.</summary>
    public Mat Edges => edges;

    /// <summary>Binary marking evidence (0 none, 255 strongest) in image pixels.</summary>
    public Mat Evidence => evidence;

    /// <summary>Evidence warped to the bird's-eye view.</summary>
    public Mat BirdsEye => birdsEye;

    internal Mat HomographyMat => homographyMat;

    internal HoughSegment[] Segments { get; }

    internal int SegmentCount { get; set; }

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

    internal double RoadMedian { get; set; }

    internal double RoadSpread { get; set; }

    /// <summary>Whether the colour stage ran its ridge test on the CLAHE-equalised grey band in this frame (a dark road).</summary>
    internal bool Equalised { get; set; }

    /// <summary>Grey-world gains (B, G, R) the colour stage applied before its white and yellow tests (1 when off).</summary>
    internal (double B, double G, double R) GreyWorldGains { get; set; } = (1, 1, 1);

    /// <summary>Share (0–1) of the marking-evidence pixels kept by the colour stage's orientation test.</summary>
    internal double EvidenceKeptShare { get; set; } = 1;

    internal int[] Histogram { get; } = new int[256];

    internal int[] DiffHistogram { get; } = new int[256];

    /// <summary>Bird's-eye bottom positions predicted by the tracker for this frame's search.</summary>
    internal double[] PriorSeedX { get; } = new double[MaxLanes];

    internal int PriorSeedCount { get; set; }

    internal int[] Prefix { get; }

    /// <summary>Per column, the highest row of a light source found by the colour stage's mirror test (int.MaxValue: none).</summary>
    internal int[] LightRow { get; }

    internal double[] ColumnMass { get; }

    internal double[] Smoothed { get; }

    internal int CandidateCount { get; set; }

    internal double[] CandidateX { get; }

    internal double[] CandidateMass { get; }

    internal SearchWindow[][] CandidateWindows { get; }

    internal LaneEstimate[] CandidateFits { get; }

    internal double[] CandidateTopY { get; }

    internal int WindowCount { get; set; }

    internal double[] FitX { get; }

    internal double[] FitY { get; }

    internal double[] FitW { get; }

    internal bool[] FitUse { get; }

    internal bool[] FitBest { get; }

    /// <summary>Lanes of the current frame (first <see cref="LaneCount"/> entries), sorted by slot.</summary>
    internal LaneEstimate[] Lanes { get; }

    /// <summary>Candidate index each reported lane came from (for drawing its windows).</summary>
    internal int[] LaneCandidate { get; }

    /// <summary>Image points of each reported lane: x0, y0, x1, y1, ... near to far.</summary>
    internal double[][] LanePoints { get; }

    /// <summary>Number of lanes detected in the current frame.</summary>
    public int LaneCount { get; internal set; }

    /// <summary>Every Mat the workspace owns (for ownership tests).</summary>
    internal IReadOnlyList<Mat> OwnedBuffers => [gray, blurred, small, edges, evidence, birdsEye, homographyMat];

    /// <summary>The detected lane <paramref name="index"/> (loan until the next frame).</summary>
    public LaneEstimate GetLane(int index) => Lanes[index];

    /// <summary>The image points of lane <paramref name="index"/> as x, y pairs, nearest first (loan until the next frame).</summary>
    public ReadOnlySpan<double> GetLanePoints(int index) => LanePoints[index].AsSpan(0, 2 * Lanes[index].PointCount);

    /// <inheritdoc />
    public void Dispose()
    {
        gray.Dispose();
        blurred.Dispose();
        edges.Dispose();
        small.Dispose();
        evidence.Dispose();
        birdsEye.Dispose();
        homographyMat.Dispose();
    }
}
