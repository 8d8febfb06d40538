using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// Step (2) of the <c>search</c> stage: windows from the bottom up, each re-centred on its evidence centroid when it
/// holds enough mass and otherwise moved along the trend of the previous centroids (dashed lines, curves). On a lit
/// road the centroid is that of the cluster of the window's column profile nearest its predicted centre
/// (<see cref="NearestCluster"/>), so a separate blob beside the line (a lens-flare rim) does not pull it.
/// </summary>
internal sealed class WindowSlider
{
    /// <summary>
    /// Empty columns that split a window's column profile into separate clusters (bird's-eye pixels): wider than the
    /// gap between the strokes of a double line in the default 480-px view (about 2 px), narrower than the gap
    /// between a boundary and a lens-flare disc beside it in the glare frames looked at (10–20 px).
    /// </summary>
    internal const int ClusterGapPx = 5;

    /// <summary>
    /// Road median lightness (grey levels, from the colour stage) from which the cluster rule applies; equal to the
    /// default <c>region.darkRoadLightness</c>, below which a frame counts as dark.
    /// </summary>
    internal const double MinLitRoadLightness = 80;

    private readonly SearchOptions search;

    /// <summary>Creates the window slider.</summary>
    public WindowSlider(SearchOptions search)
    {
        this.search = search;
    }

    /// <summary>Slides the windows of one candidate from the bottom up.</summary>
    public unsafe void Slide(FrameWorkspace ws, int candidate)
    {
        int bw = ws.Warp.BirdsEyeWidth, bh = ws.Warp.BirdsEyeHeight;
        int n = Math.Min(search.WindowCount, FrameWorkspace.MaxWindows);
        int hw = search.WindowHalfWidthPx;
        double wh = (double)bh / n;
        byte* b = (byte*)ws.Warp.BirdsEye.DataPointer;
        long step = ws.Warp.BirdsEye.Step();
        SearchWindow[] windows = ws.Search.CandidateWindows[candidate];
        double cx = ws.Search.CandidateX[candidate];
        double trend = 0;
        double lastX = double.NaN;
        int lastK = -1;

        // Lens flare needs the sun in view: on a dark road (wet night, night) the window keeps its whole centroid,
        // where a separate run beside the followed one is as likely a reflection streak the line continues into.
        bool lit = ws.Color.RoadMedian >= MinLitRoadLightness;
        Span<double> colMass = stackalloc double[(2 * hw) + 1];
        Span<double> colY = stackalloc double[(2 * hw) + 1];
        for (int k = 0; k < n; k++)
        {
            int bottom = (int)Math.Round(bh - (k * wh));
            int top = (int)Math.Round(bh - ((k + 1) * wh));
            int x0 = Math.Max(0, (int)Math.Round(cx) - hw), x1 = Math.Min(bw - 1, (int)Math.Round(cx) + hw);
            int cols = x1 - x0 + 1;
            colMass[..Math.Max(0, cols)].Clear();
            colY[..Math.Max(0, cols)].Clear();
            for (int y = Math.Max(0, top); y < bottom; y++)
            {
                byte* row = b + (y * step);
                for (int x = x0; x <= x1; x++)
                {
                    int v = row[x];
                    if (v != 0)
                    {
                        colMass[x - x0] += v;
                        colY[x - x0] += v * y;
                    }
                }
            }

            (double m, double sx, double sy) = lit
                ? NearestCluster(colMass[..Math.Max(0, cols)], colY[..Math.Max(0, cols)], x0, cx)
                : NearestCluster(colMass[..Math.Max(0, cols)], colY[..Math.Max(0, cols)], x0, double.NaN);
            double mass = m / 255.0;
            if (mass >= search.MinWindowMass && x1 >= x0)
            {
                double xc = sx / m, yc = sy / m;
                windows[k] = new SearchWindow(xc, yc, mass, x0, top, x1, bottom, false);
                if (lastK >= 0)
                {
                    double t = (xc - lastX) / (k - lastK);
                    trend = double.IsNaN(trend) ? t : (0.5 * trend) + (0.5 * t);
                }

                lastX = xc;
                lastK = k;
                cx = xc + trend;
            }
            else
            {
                windows[k] = new SearchWindow(cx, (top + bottom) / 2.0, 0, x0, top, x1, bottom, false);
                cx += trend;
            }

            if (cx < -hw || cx > bw + hw)
            {
                for (int j = k + 1; j < n; j++)
                {
                    windows[j] = default;
                }

                break;
            }
        }

        ws.Search.WindowCount = n;
    }

    /// <summary>
    /// Mass and first moments of the cluster of a window's column profile nearest the window's predicted centre
    /// <paramref name="cx"/> (its seed or the trend of the previous centroids): clusters are runs of columns with
    /// evidence, where gaps of fewer than <see cref="ClusterGapPx"/> empty columns do not split a run. A marking (also a
    /// double line, whose strokes lie a few bird's-eye pixels apart) is one cluster; a separate blob beside it in the
    /// same window, such as the rim of a lens-flare disc next to a boundary in glare, is another and no longer pulls the
    /// centroid off the paint. The window thus settles on the mode of the evidence it is following rather than on the
    /// mean of everything inside it, as a mean-shift step with a flat kernel would (Comaniciu &amp; Meer, IEEE TPAMI
    /// 24(5):603–619, 2002). Distance of a cluster = distance from <paramref name="cx"/> to its nearest column (0 when
    /// inside); ties keep the heavier cluster. Returns (Σv, Σv·x, Σv·y) in grey levels; one cluster gives the whole
    /// window's sums, and so does a NaN <paramref name="cx"/>.
    /// </summary>
    internal static (double Mass, double SumX, double SumY) NearestCluster(ReadOnlySpan<double> colMass, ReadOnlySpan<double> colY, int x0, double cx)
    {
        double bestM = 0, bestX = 0, bestY = 0, bestD = double.MaxValue;
        if (double.IsNaN(cx))
        {
            // No prediction to follow: the whole window's sums.
            for (int i = 0; i < colMass.Length; i++)
            {
                bestM += colMass[i];
                bestX += colMass[i] * (x0 + i);
                bestY += colY[i];
            }

            return (bestM, bestX, bestY);
        }

        double m = 0, sx = 0, sy = 0;
        int first = -1, last = -1, gap = 0;
        for (int i = 0; i <= colMass.Length; i++)
        {
            double v = i < colMass.Length ? colMass[i] : 0;
            if (v > 0)
            {
                if (m == 0)
                {
                    first = i;
                }

                m += v;
                sx += v * (x0 + i);
                sy += colY[i];
                last = i;
                gap = 0;
                continue;
            }

            gap++;
            if ((gap == ClusterGapPx || i == colMass.Length) && m > 0)
            {
                double d = Math.Max(0, Math.Max(x0 + first - cx, cx - (x0 + last)));
                if (d < bestD || (d == bestD && m > bestM))
                {
                    (bestM, bestX, bestY, bestD) = (m, sx, sy, d);
                }

                (m, sx, sy) = (0, 0, 0);
            }
        }

        return (bestM, bestX, bestY);
    }
}
