using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>Marking kind of a reported lane (part of the <c>search</c> stage).</summary>
internal static class MarkingKind
{
    /// <summary>
    /// Solid or dashed from the windows along the fit that lie inside the frame: a solid line holds evidence in at
    /// least 80 % of them, a dashed one in at most 60 % with at least two gaps; anything else is not estimated (null).
    /// </summary>
    public static string? Estimate(FrameWorkspace ws, int candidate, Core.Results.Quadratic curve)
    {
        SearchWindow[] windows = ws.Search.CandidateWindows[candidate];
        int inside = 0, filled = 0, gaps = 0;
        bool previousFilled = true;
        for (int k = 0; k < ws.Search.WindowCount; k++)
        {
            SearchWindow win = windows[k];
            double yc = (win.Top + win.Bottom) / 2.0;
            if (win.Bottom <= win.Top || !ws.Region.BirdsEyeToImage.TryMap(curve.At(yc), yc, out double xi, out _) || xi < 0 || xi > ws.Width - 1)
            {
                continue;
            }

            inside++;
            bool has = win.Mass > 0 && Math.Abs(win.X - curve.At(win.Y)) <= 2 * (win.Right - win.Left);
            if (has)
            {
                filled++;
            }
            else if (previousFilled)
            {
                gaps++;
            }

            previousFilled = has;
        }

        if (inside < 4)
        {
            return null;
        }

        double share = (double)filled / inside;
        return share >= 0.8 ? "solid" : share <= 0.6 && gaps >= 2 ? "dashed" : null;
    }
}
