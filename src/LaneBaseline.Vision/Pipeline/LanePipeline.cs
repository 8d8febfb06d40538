using LaneBaseline.Core;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Stages;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The classical lane pipeline for one stream of frames: owns its stages and its <see cref="FrameWorkspace"/>,
/// builds them for the first frame's size (and again only if the size changes), and runs them in the fixed order
/// (resize, for frames narrower than <c>limits.workingWidthPx</c>) → gradient → hough → region → color → warp →
/// search → marking (→ calibrate, with a calibration; → track, when tracking is on). Not thread-safe: use one
/// pipeline per worker.
/// </summary>
public sealed class LanePipeline : IDisposable
{
    /// <summary>Frames narrower than the working width are enlarged by at most this factor.</summary>
    public const double MaxEnlargement = WorkingScale.MaxEnlargement;

    private readonly PipelineOptions options;
    private readonly List<IFrameStage> stages = [];
    private readonly (double X, double Y)? cameraVanishingPoint;
    private readonly CameraModel? camera;
    private FrameWorkspace? workspace;

    /// <summary>Creates a pipeline; stages are built on the first frame.</summary>
    /// <param name="options">Validated options.</param>
    /// <param name="cameraVanishingPoint">Vanishing point from a camera file (image pixels), or null to estimate it per frame.</param>
    /// <param name="camera">The camera file's model (frame pixels): with it, and <see cref="MetricViewOptions.MetresPerPx"/>
    /// above 0, the bird's-eye view is metric (<see cref="MetricBirdsEye"/>); null keeps the vanishing-point trapezoid.</param>
    /// <exception cref="BadInputException">The options are invalid.</exception>
    public LanePipeline(PipelineOptions options, (double X, double Y)? cameraVanishingPoint = null, CameraModel? camera = null)
    {
        this.cameraVanishingPoint = cameraVanishingPoint;
        this.camera = camera;
        ArgumentNullException.ThrowIfNull(options);
        IReadOnlyList<OptionsFinding> findings = options.Validate();
        if (findings.Count > 0)
        {
            throw new BadInputException("invalid options: " + string.Join("; ", findings.Select(f => f.Key + ": " + f.Problem)));
        }

        this.options = options;
    }

    /// <summary>The workspace of the current stream (null before the first frame). Its buffers are loans.</summary>
    public FrameWorkspace? Workspace => workspace;

    /// <summary>Stage names in run order (after the first frame).</summary>
    public IReadOnlyList<string> StageNames => stages.Select(s => s.Name).ToArray();

    /// <summary>Per-stage elapsed milliseconds of the last frame, in stage order (filled when <see cref="MeasureStages"/> is on).</summary>
    public double[] LastStageMs { get; private set; } = [];

    /// <summary>Whether to time each stage (for the benchmark).</summary>
    public bool MeasureStages { get; set; }

    /// <summary>Processes one 8-bit BGR frame (borrowed for the call).</summary>
    /// <param name="frame">Frame, 8-bit, 3 channels (BGR).</param>
    /// <param name="timestampSeconds">Frame time in seconds (drives tracking; ignored for stills).</param>
    /// <returns>The frame's finished lanes and vanishing point, in the frame's own pixels (the workspace keeps the
    /// working-pixel intermediates until the next call, for overlays and stage sheets).</returns>
    public FrameResult Process(Mat frame, double timestampSeconds)
    {
        ArgumentNullException.ThrowIfNull(frame);
        if (frame.Type() != MatType.CV_8UC3)
        {
            throw new ArgumentException("the pipeline expects an 8-bit 3-channel BGR frame", nameof(frame));
        }

        WorkingScale scaling = WorkingScale.For(frame.Cols, frame.Rows, options.Limits.WorkingWidthPx);
        if (workspace is null || workspace.Scaling != scaling)
        {
            Build(scaling);
        }

        FrameWorkspace ws = workspace!;
        ws.Frame = frame; // the resize stage, when present, points it at its enlarged copy

        ws.TimestampSeconds = timestampSeconds;
        if (MeasureStages)
        {
            for (int i = 0; i < stages.Count; i++)
            {
                long t0 = System.Diagnostics.Stopwatch.GetTimestamp();
                stages[i].Process(ws);
                LastStageMs[i] = System.Diagnostics.Stopwatch.GetElapsedTime(t0).TotalMilliseconds;
            }
        }
        else
        {
            for (int i = 0; i < stages.Count; i++)
            {
                stages[i].Process(ws);
            }
        }

        (double vx, double vy) = scaling.ToFrame(ws.Region.VanishingX, ws.Region.VanishingY);
        return new FrameResult(ws.LaneCount, vx, vy, ws.Region.VanishingSource) { Lanes = FinishedLanes(ws) };
    }

    /// <summary>
    /// The lanes of the frame just processed, in the frame's own pixels, as lane files carry them (points rounded to
    /// 0.01 px, scores clamped to [0, 1] and rounded to 4 digits), so detect and tune score exactly the same lanes.
    /// </summary>
    private static Lane[] FinishedLanes(FrameWorkspace ws)
    {
        var lanes = new Lane[ws.LaneCount];
        for (int i = 0; i < lanes.Length; i++)
        {
            LaneEstimate e = ws.GetLane(i);
            ReadOnlySpan<double> pts = ws.GetLanePoints(i);
            var points = new LanePoint[e.PointCount];
            for (int k = 0; k < e.PointCount; k++)
            {
                (double x, double y) = ws.ToFramePixels(pts[2 * k], pts[(2 * k) + 1]); // working pixels -> the frame's own
                points[k] = new LanePoint(Math.Round(x, 2), Math.Round(y, 2));
            }

            lanes[i] = new Lane { Points = points, Slot = e.Slot, Score = Math.Round(Math.Clamp(e.Score, 0, 1), 4), Kind = e.Kind };
        }

        return lanes;
    }

    /// <summary>Starts a new sequence: forgets tracks and the smoothed vanishing point (frames that follow are unrelated).</summary>
    public void ResetSequence()
    {
        if (workspace is not null)
        {
            workspace.Region.HasPreviousVanishing = false;
            workspace.Track.PriorSeedCount = 0;
        }

        foreach (IFrameStage s in stages)
        {
            (s as TemporalTracker)?.Reset();
        }
    }

    /// <summary>
    /// The size a w×h frame is processed at: enlarged towards <paramref name="workingWidth"/> (by at most
    /// <see cref="MaxEnlargement"/>, aspect kept) when narrower, else its own (also when the working width is 0).
    /// </summary>
    public static (int Width, int Height) WorkingSize(int w, int h, int workingWidth)
    {
        WorkingScale s = WorkingScale.For(w, h, workingWidth);
        return (s.Width, s.Height);
    }

    private void Build(WorkingScale scaling)
    {
        DisposeStages();
        workspace?.Dispose();
        MetricView? view = MetricView.For(options, camera, scaling);
        workspace = StageFactory.CreateWorkspace(options, scaling, view);
        (double X, double Y)? vanishing = cameraVanishingPoint is (double vx, double vy) ? scaling.ToWorking(vx, vy) : null;
        stages.AddRange(StageFactory.CreateStages(options, scaling, vanishing, view));
        LastStageMs = new double[stages.Count];
    }

    private void DisposeStages()
    {
        foreach (IFrameStage s in stages)
        {
            s.Dispose();
        }

        stages.Clear();
    }

    /// <inheritdoc />
    public void Dispose()
    {
        DisposeStages();
        workspace?.Dispose();
        workspace = null;
    }
}
