using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// The plausible lane width in bird's-eye pixels. In the metric view of a camera file (one pixel s metres) it is
/// <see cref="MetricViewOptions.MinLaneWidthM"/>/s .. <see cref="MetricViewOptions.MaxLaneWidthM"/>/s (2.5–4.5 m by
/// default, a range that holds the lane widths of the road design guides we know of: from memory, about 2.7–3.7 m
/// with margin); otherwise the fractions <see cref="SearchOptions.MinLaneWidthFraction"/> and
/// <see cref="SearchOptions.MaxLaneWidthFraction"/> of the bird's-eye width.
/// </summary>
internal static class LaneWidthLimits
{
    /// <summary>Smallest and largest plausible lane width, bird's-eye pixels.</summary>
    public static (double MinPx, double MaxPx) Of(SearchOptions search, FrameWorkspace ws)
    {
        double s = ws.Warp.MetresPerPixel;
        if (s > 0)
        {
            return (ws.Warp.MinLaneWidthM / s, ws.Warp.MaxLaneWidthM / s);
        }

        int bw = ws.Warp.BirdsEyeWidth;
        return (search.MinLaneWidthFraction * bw, search.MaxLaneWidthFraction * bw);
    }
}
