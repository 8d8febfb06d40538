using LaneBaseline.Core;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Stages;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The classical lane pipeline for one stream of frames: owns its stages and its <see cref="FrameWorkspace"/>,
/// builds them for the first frame's size (and again only if the size changes), and runs them in the fixed order
/// (resize, for frames narrower than <c>limits.workingWidthPx</c>) → gradient → hough → region → color → warp →
/// search (→ track, when tracking is on). Not thread-safe: use one
/// pipeline per worker.
/// </summary>
public sealed class LanePipeline : IDisposable
{
    /// <summary>Frames narrower than the working width are enlarged by at most this factor.</summary>
    public const double MaxEnlargement = 4;

    private readonly PipelineOptions options;
    private readonly List<IFrameStage> stages = [];
    private readonly (double X, double Y)? cameraVanishingPoint;
    private FrameWorkspace? workspace;

    /// <summary>Creates a pipeline; stages are built on the first frame.</summary>
    /// <param name="options">Validated options.</param>
    /// <param name="cameraVanishingPoint">Vanishing point from a camera file (image pixels), or null to estimate it per frame.</param>
    /// <exception cref="BadInputException">The options are invalid.</exception>
    public LanePipeline(PipelineOptions options, (double X, double Y)? cameraVanishingPoint = null)
    {
        this.cameraVanishingPoint = cameraVanishingPoint;
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
    /// <returns>The frame summary (vanishing point in the frame's own pixels); lanes are read with
    /// <see cref="FrameWorkspace.GetLane"/> until the next call, in working pixels (<see cref="FrameWorkspace.ToFramePixels"/> maps them back).</returns>
    public FrameResult Process(Mat frame, double timestampSeconds)
    {
        ArgumentNullException.ThrowIfNull(frame);
        if (frame.Type() != MatType.CV_8UC3)
        {
            throw new ArgumentException("the pipeline expects an 8-bit 3-channel BGR frame", nameof(frame));
        }

        int w = frame.Cols, h = frame.Rows;
        (int ww, int wh) = WorkingSize(w, h, options.Limits.WorkingWidthPx);
        if (workspace is null || workspace.Width != ww || workspace.Height != wh || workspace.FrameWidth != w || workspace.FrameHeight != h)
        {
            Build(ww, wh, w, h);
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

        (double vx, double vy) = !ws.Enlarged ? (ws.VanishingX, ws.VanishingY) : (((ws.VanishingX + 0.5) / ws.Scale) - 0.5, ((ws.VanishingY + 0.5) / ws.ScaleY) - 0.5);
        return new FrameResult(ws.LaneCount, vx, vy, ws.VanishingSource);
    }

    /// <summary>Starts a new sequence: forgets tracks and the smoothed vanishing point (frames that follow are unrelated).</summary>
    public void ResetSequence()
    {
        if (workspace is not null)
        {
            workspace.HasPreviousVanishing = false;
            workspace.PriorSeedCount = 0;
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
        if (workingWidth <= 0 || w >= workingWidth)
        {
            return (w, h);
        }

        double scale = Math.Min(MaxEnlargement, (double)workingWidth / w);
        return ((int)Math.Round(w * scale), (int)Math.Round(h * scale));
    }

    private void Build(int width, int height, int frameWidth, int frameHeight)
    {
        DisposeStages();
        workspace?.Dispose();
        int bandTop = Math.Clamp((int)Math.Round(options.Region.SearchTopFraction * height), 0, height - 2);
        double sx = (double)width / frameWidth, sy = (double)height / frameHeight; // the ratios the resize stage applies
        workspace = new FrameWorkspace(width, height, options.Warp.WidthPx, options.Warp.HeightPx, bandTop, options.Hough.MaxSegments, options.Hough.ImageScale)
        {
            Scale = sx,
            ScaleY = sy,
            FrameWidth = frameWidth,
            FrameHeight = frameHeight,
        };
        (double X, double Y)? vanishing = cameraVanishingPoint is (double vx, double vy) ? (((vx + 0.5) * sx) - 0.5, ((vy + 0.5) * sy) - 0.5) : null;
        if (width != frameWidth || height != frameHeight)
        {
            stages.Add(new ResizeStage());
        }

        stages.Add(new GradientStage(options.Gradient));
        stages.Add(new HoughStage(options.Hough));
        stages.Add(new RegionStage(options.Region, options.Warp, options.Tracking.Enabled, vanishing));
        stages.Add(new ColorThresholdStage(options.Color, options.Gradient));
        stages.Add(new BirdsEyeWarpStage());
        stages.Add(new SlidingWindowFitStage(options.Search, options.Fit, options.Confidence));
        if (options.Calibration is not null)
        {
            stages.Add(new CalibrationStep(options.Calibration, options.Confidence.MinScore));
        }

        if (options.Tracking.Enabled)
        {
            stages.Add(new TemporalTracker(options.Tracking, options.Fit));
        }
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
