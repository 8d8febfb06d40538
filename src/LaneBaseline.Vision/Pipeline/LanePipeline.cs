using System.Globalization;
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
        int width = scaling.Width, height = scaling.Height;
        DisposeStages();
        workspace?.Dispose();
        int bandTop = Math.Clamp((int)Math.Round(options.Region.SearchTopFraction * height), 0, height - 2);
        MetricViewOptions metric = options.Metric ?? new MetricViewOptions();
        (PlaneHomography H, int W, int Ht)? view = camera is not null && metric.IsEnabled() ? MetricView(camera, metric, scaling) : null;
        workspace = new FrameWorkspace(width, height, view?.W ?? options.Warp.WidthPx, view?.Ht ?? options.Warp.HeightPx, bandTop, options.Hough.MaxSegments, options.Hough.ImageScale)
        {
            Scaling = scaling,
        };
        if (view is not null)
        {
            workspace.Warp.MetresPerPixel = metric.MetresPerPx;
            workspace.Warp.MinLaneWidthM = metric.MinLaneWidthM;
            workspace.Warp.MaxLaneWidthM = metric.MaxLaneWidthM;
        }

        (double X, double Y)? vanishing = cameraVanishingPoint is (double vx, double vy) ? scaling.ToWorking(vx, vy) : null;
        if (scaling.Enlarged)
        {
            stages.Add(new ResizeStage());
        }

        stages.Add(new GradientStage(options.Gradient));
        stages.Add(new HoughStage(options.Hough));
        stages.Add(new RegionStage(options.Region, options.Warp, options.Tracking.Enabled, vanishing, view?.H));
        stages.Add(new ColorThresholdStage(options.Color, options.Gradient));
        stages.Add(new BirdsEyeWarpStage());
        stages.Add(new SlidingWindowFitStage(options.Search, options.Fit, options.Confidence));
        stages.Add(new MarkingProfileStage(options.Gradient));
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

    /// <summary>
    /// The camera's metric bird's-eye view for the working size: the homography from the camera's (frame) pixels
    /// (<see cref="MetricBirdsEye.ImageToBirdsEye"/>), re-solved from the four corners of the view mapped to working
    /// pixels, and the view's size.
    /// </summary>
    private static (PlaneHomography H, int W, int Ht) MetricView(CameraModel camera, MetricViewOptions metric, WorkingScale scaling)
    {
        double near;
        try
        {
            near = metric.NearDistanceM > 0 ? metric.NearDistanceM : MetricBirdsEye.BottomRowDistance(camera);
        }
        catch (ArgumentOutOfRangeException)
        {
            throw new BadInputException("camera: the bottom image row does not see the ground ahead, so metric.nearDistanceM must be given");
        }

        if (near >= metric.FarDistanceM)
        {
            throw new BadInputException(string.Create(
                CultureInfo.InvariantCulture,
                $"metric.farDistanceM: {metric.FarDistanceM} m is not beyond the near edge of the view ({near:0.##} m ahead)"));
        }

        int w = metric.WidthPx(), h = metric.HeightPx(near);
        PlaneHomography frameToView;
        try
        {
            frameToView = MetricBirdsEye.ImageToBirdsEye(camera, metric.MetresPerPx, near, w, h);
        }
        catch (ArgumentOutOfRangeException)
        {
            throw new BadInputException("metric: the metric view reaches the horizon of the camera; lower metric.farDistanceM");
        }

        if (!scaling.Enlarged)
        {
            return (frameToView, w, h);
        }

        PlaneHomography viewToFrame = frameToView.Inverse();
        ReadOnlySpan<double> viewCorners = [0, 0, w - 1, 0, w - 1, h - 1, 0, h - 1];
        Span<double> working = stackalloc double[8];
        for (int k = 0; k < 4; k++)
        {
            viewToFrame.TryMap(viewCorners[2 * k], viewCorners[(2 * k) + 1], out double fx, out double fy);
            (working[2 * k], working[(2 * k) + 1]) = scaling.ToWorking(fx, fy);
        }

        return PlaneHomography.TryFromPoints(working, viewCorners, out PlaneHomography hw)
            ? (hw, w, h)
            : throw new BadInputException("metric: degenerate metric bird's-eye view");
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
