using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline.Workspace;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The per-stream buffers the stages share: built once for a frame size, reused for every frame. Every
/// <see cref="Mat"/> here is owned by the workspace and disposed with it; stages and callers only borrow them
/// until the next frame. The buffers are grouped by the stage that writes them (<see cref="Gradient"/>,
/// <see cref="Hough"/>, <see cref="Region"/>, <see cref="Color"/>, <see cref="Warp"/>, <see cref="Search"/>,
/// <see cref="Track"/>), so a stage's reads and writes show in the sections it touches; frame-level facts (sizes,
/// scaling, the frame itself) and the finished lanes stay here. Coordinates: pixel (x, y), origin top-left, y down; bird's-eye buffers likewise.
/// </summary>
public sealed class FrameWorkspace : IDisposable
{
    /// <summary>Most points written per lane.</summary>
    public const int MaxPointsPerLane = 256;

    /// <summary>Most lanes per frame (slots −3 to +3 without 0).</summary>
    public const int MaxLanes = 6;

    internal const int MaxCandidates = 12;
    internal const int MaxWindows = 64;

    internal FrameWorkspace(int width, int height, int birdsEyeWidth, int birdsEyeHeight, int bandTop, int maxSegments, double edgeScale)
    {
        Width = width;
        Height = height;
        BandTop = bandTop;
        Gradient = new GradientSection(this, width, height, bandTop, edgeScale);
        Hough = new HoughSection(maxSegments);
        Region = new RegionSection();
        Color = new ColorSection(width, height);
        Warp = new WarpSection(birdsEyeWidth, birdsEyeHeight);
        Search = new SearchSection(birdsEyeWidth);
        Track = new TrackSection();
        LanePoints = new double[MaxLanes][];
        for (int i = 0; i < MaxLanes; i++)
        {
            LanePoints[i] = new double[2 * MaxPointsPerLane];
        }

        Lanes = new LaneEstimate[MaxLanes];
        LaneCandidate = new int[MaxLanes];
    }

    /// <summary>Stage <c>gradient</c>'s outputs: grey image, blurred band, Canny edges.</summary>
    public GradientSection Gradient { get; }

    /// <summary>Stage <c>hough</c>'s outputs: line segments.</summary>
    public HoughSection Hough { get; }

    /// <summary>Stage <c>region</c>'s outputs: vanishing point, trapezoid, homographies.</summary>
    public RegionSection Region { get; }

    /// <summary>Stage <c>color</c>'s outputs: marking evidence and road statistics.</summary>
    public ColorSection Color { get; }

    /// <summary>Stage <c>warp</c>'s output: the bird's-eye evidence.</summary>
    public WarpSection Warp { get; }

    /// <summary>The sliding-window search's candidates and scratch (stage <c>fit</c>).</summary>
    public SearchSection Search { get; }

    /// <summary>The tracker's predictions for the next frame's search.</summary>
    public TrackSection Track { get; }

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

    /// <summary>First image row of the Hough search band.</summary>
    public int BandTop { get; }

    /// <summary>The current frame at the working size (8-bit BGR): the caller's frame, or the pipeline's enlarged copy; borrowed for one <c>Process</c> call.</summary>
    public Mat Frame { get; internal set; } = null!;

    /// <summary>Timestamp of the current frame, in seconds.</summary>
    public double TimestampSeconds { get; internal set; }

    /// <summary>Lanes of the current frame (first <see cref="LaneCount"/> entries), sorted by slot.</summary>
    internal LaneEstimate[] Lanes { get; }

    /// <summary>Candidate index each reported lane came from (for drawing its windows).</summary>
    internal int[] LaneCandidate { get; }

    /// <summary>Image points of each reported lane: x0, y0, x1, y1, ... near to far.</summary>
    internal double[][] LanePoints { get; }

    /// <summary>Number of lanes detected in the current frame.</summary>
    public int LaneCount { get; internal set; }

    /// <summary>Every Mat the workspace owns (for ownership tests).</summary>
    internal IReadOnlyList<Mat> OwnedBuffers => [.. Gradient.OwnedBuffers, .. Region.OwnedBuffers, .. Color.OwnedBuffers, .. Warp.OwnedBuffers];

    /// <summary>The detected lane <paramref name="index"/> (loan until the next frame).</summary>
    public LaneEstimate GetLane(int index) => Lanes[index];

    /// <summary>The image points of lane <paramref name="index"/> as x, y pairs, nearest first (loan until the next frame).</summary>
    public ReadOnlySpan<double> GetLanePoints(int index) => LanePoints[index].AsSpan(0, 2 * Lanes[index].PointCount);

    /// <inheritdoc />
    public void Dispose()
    {
        Gradient.Dispose();
        Region.Dispose();
        Color.Dispose();
        Warp.Dispose();
    }
}
