using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// Step (2) of the <c>search</c> stage: windows from the bottom up, each re-centred on its evidence centroid when it
/// holds enough mass and otherwise moved along the trend of the previous centroids (dashed lines, curves).
/// </summary>
internal sealed class WindowSlider
{
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
        for (int k = 0; k < n; k++)
        {
            int bottom = (int)Math.Round(bh - (k * wh));
            int top = (int)Math.Round(bh - ((k + 1) * wh));
            int x0 = Math.Max(0, (int)Math.Round(cx) - hw), x1 = Math.Min(bw - 1, (int)Math.Round(cx) + hw);
            double m = 0, sx = 0, sy = 0;
            for (int y = Math.Max(0, top); y < bottom; y++)
            {
                byte* row = b + (y * step);
                for (int x = x0; x <= x1; x++)
                {
                    int v = row[x];
                    if (v != 0)
                    {
                        m += v;
                        sx += v * x;
                        sy += v * y;
                    }
                }
            }

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
}
