using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>Turns a bird's-eye lane curve into an image polyline (near to far, inside the frame).</summary>
internal static class LaneSampler
{
    /// <summary>Samples the curve at image rows from the bottom up to the bird's-eye row <paramref name="topY"/>; keeps the longest run inside the frame.</summary>
    public static int Sample(FrameWorkspace ws, FitOptions fit, Quadratic q, double topY, double[] dst)
    {
        PlaneHomography toBird = ws.Region.ImageToBirdsEye, toImage = ws.Region.BirdsEyeToImage;
        int w = ws.Width, h = ws.Height;
        double cx = (ws.Warp.BirdsEyeWidth - 1) / 2.0;
        if (!toImage.TryMap(cx, topY, out _, out double yTopImage))
        {
            return 0;
        }

        int bestStart = 0, bestLen = 0, runStart = 0, runLen = 0, total = 0;
        int capacity = dst.Length / 2;
        double spacing = fit.PointSpacingPx;
        for (double y = h - 1; y >= yTopImage - 1e-9 && total < capacity; y -= spacing)
        {
            if (!toBird.TryMap(w / 2.0, y, out _, out double yw) || !toImage.TryMap(q.At(yw), yw, out double xi, out double yi))
            {
                continue;
            }

            bool inside = double.IsFinite(xi) && xi >= 0 && xi <= w - 1 && Math.Abs(yi - y) < 0.5;
            if (inside)
            {
                if (runLen == 0)
                {
                    runStart = total;
                }

                dst[2 * total] = xi;
                dst[(2 * total) + 1] = y;
                total++;
                runLen++;
                if (runLen > bestLen)
                {
                    bestLen = runLen;
                    bestStart = runStart;
                }
            }
            else
            {
                runLen = 0;
            }
        }

        bool runReachesTop = bestLen >= 2 && bestStart + bestLen == total && runLen == bestLen;
        if (bestStart > 0)
        {
            Array.Copy(dst, 2 * bestStart, dst, 0, 2 * bestLen);
        }

        if (runReachesTop && fit.HorizonExtensionFraction > 0)
        {
            bestLen = ExtendTowardsHorizon(ws, fit, dst, bestLen);
        }

        return bestLen;
    }

    /// <summary>
    /// Continues the polyline beyond the warped area along its image tangent, over
    /// <see cref="FitOptions.HorizonExtensionFraction"/> of the rows left between its far end and the horizon (far away
    /// a road line is nearly straight in the image and its remaining pixel length is short).
    /// </summary>
    private static int ExtendTowardsHorizon(FrameWorkspace ws, FitOptions fit, double[] dst, int count)
    {
        int capacity = dst.Length / 2;
        double x1 = dst[2 * (count - 1)], y1 = dst[(2 * count) - 1];
        double x0 = dst[2 * (count - 2)], y0 = dst[(2 * count) - 3];
        double slope = (x1 - x0) / (y1 - y0);
        double stop = ws.Region.VanishingY + ((1 - fit.HorizonExtensionFraction) * (y1 - ws.Region.VanishingY));
        if (stop >= y1 - 1)
        {
            return count;
        }

        double spacing = fit.PointSpacingPx;
        for (double y = y1 - spacing; count < capacity; y -= spacing)
        {
            double yy = Math.Max(y, stop);
            double x = x1 + (slope * (yy - y1));
            if (x < 0 || x > ws.Width - 1 || yy < 0)
            {
                break;
            }

            dst[2 * count] = x;
            dst[(2 * count) + 1] = yy;
            count++;
            if (yy <= stop)
            {
                break;
            }
        }

        return count;
    }
}
