using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Stages;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The one place that builds a pipeline's workspace and stages, in run order, for a working size and options: resize
/// (only for frames enlarged to the working width) → gradient → hough → region → color → warp → search → marking
/// (→ calibrate, with a calibration; → track, when tracking is on). <see cref="LanePipeline"/> and the stage tests
/// both build through it, so a test runs exactly the stages the pipeline runs.
/// </summary>
public static class StageFactory
{
    /// <summary>A workspace for frames processed at <paramref name="scaling"/>; the caller owns and disposes it.</summary>
    /// <param name="options">Validated options.</param>
    /// <param name="scaling">Frame and working sizes.</param>
    /// <param name="metric">The camera's metric bird's-eye view (its size replaces warp.widthPx × warp.heightPx), or null.</param>
    public static FrameWorkspace CreateWorkspace(PipelineOptions options, WorkingScale scaling, MetricView? metric = null)
    {
        ArgumentNullException.ThrowIfNull(options);
        int width = scaling.Width, height = scaling.Height;
        int bandTop = Math.Clamp((int)Math.Round(options.Region.SearchTopFraction * height), 0, height - 2);
        var ws = new FrameWorkspace(width, height, metric?.WidthPx ?? options.Warp.WidthPx, metric?.HeightPx ?? options.Warp.HeightPx, bandTop, options.Hough.MaxSegments, options.Hough.ImageScale)
        {
            Scaling = scaling,
        };
        if (metric is not null)
        {
            ws.Warp.MetresPerPixel = metric.Options.MetresPerPx;
            ws.Warp.MinLaneWidthM = metric.Options.MinLaneWidthM;
            ws.Warp.MaxLaneWidthM = metric.Options.MaxLaneWidthM;
        }

        return ws;
    }

    /// <summary>The stages in run order; the caller owns and disposes each.</summary>
    /// <param name="options">Validated options.</param>
    /// <param name="scaling">Frame and working sizes (a resize stage is added when the frame is enlarged).</param>
    /// <param name="vanishingWorking">A fixed vanishing point in working pixels (from a camera file), or null to estimate it per frame.</param>
    /// <param name="metric">The camera's metric bird's-eye view, warped to instead of the vanishing-point trapezoid, or null.</param>
    public static List<IFrameStage> CreateStages(PipelineOptions options, WorkingScale scaling, (double X, double Y)? vanishingWorking, MetricView? metric = null)
    {
        ArgumentNullException.ThrowIfNull(options);
        var stages = new List<IFrameStage>();
        if (scaling.Enlarged)
        {
            stages.Add(new ResizeStage());
        }

        stages.Add(new GradientStage(options.Gradient));
        stages.Add(new HoughStage(options.Hough));
        stages.Add(new RegionStage(options.Region, options.Warp, options.Tracking.Enabled, vanishingWorking, metric?.ImageToBirdsEye));
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

        return stages;
    }
}
