using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.Options;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The metric bird's-eye view of a camera file for one working size: the homography from working pixels to the view
/// (one view pixel <see cref="MetricViewOptions.MetresPerPx"/> metres on the ground, <see cref="MetricBirdsEye"/>)
/// and the view's size. Built once per stream by <see cref="StageFactory"/>'s callers.
/// </summary>
/// <param name="ImageToBirdsEye">Working pixels to view pixels.</param>
/// <param name="WidthPx">View width, pixels.</param>
/// <param name="HeightPx">View height, pixels.</param>
/// <param name="Options">The metric options it was built from.</param>
public sealed record MetricView(PlaneHomography ImageToBirdsEye, int WidthPx, int HeightPx, MetricViewOptions Options)
{
    /// <summary>
    /// The view for a camera (frame pixels) at a working size, or null without a camera or with
    /// <see cref="MetricViewOptions.MetresPerPx"/> 0. The camera's homography (<see cref="MetricBirdsEye.ImageToBirdsEye"/>)
    /// is re-solved from the four corners of the view mapped to working pixels when frames are enlarged.
    /// </summary>
    /// <exception cref="BadInputException">The camera and the metric options give no usable view.</exception>
    public static MetricView? For(PipelineOptions options, CameraModel? camera, WorkingScale scaling)
    {
        ArgumentNullException.ThrowIfNull(options);
        MetricViewOptions metric = options.Metric ?? new MetricViewOptions();
        if (camera is null || !metric.IsEnabled())
        {
            return null;
        }

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
            return new MetricView(frameToView, w, h, metric);
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
            ? new MetricView(hw, w, h, metric)
            : throw new BadInputException("metric: degenerate metric bird's-eye view");
    }
}
