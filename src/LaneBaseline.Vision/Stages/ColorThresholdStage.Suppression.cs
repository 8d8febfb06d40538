using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using System.Runtime.CompilerServices;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>Evidence that is not paint: light-source columns and their mirror streaks, saturated blobs, runs off the vanishing-point axis.</summary>
public sealed partial class ColorThresholdStage
{
    /// <summary>
    /// For every column, the highest row (smallest y) between the top of the frame and
    /// <see cref="ColorOptions.LightSourceBelowHorizonFraction"/> × height below the horizon whose grey level is at least
    /// <see cref="ColorOptions.LightSourceLightness"/> (a street lamp, the moon, a vehicle's lights); int.MaxValue where
    /// there is none. Paint is never above the horizon and is not that bright at night, so these are light sources.
    /// Lights are small: when more than a quarter of the columns hold one, the sky itself is bright (a dark road under
    /// a daylight sky, e.g. in shadow) and the test is not applied.
    /// </summary>
    /// <returns>Whether the mirror test applies to this frame.</returns>
    private unsafe bool FindLightColumns(FrameWorkspace workspace)
    {
        int w = workspace.Width, h = workspace.Height;
        int[] lightRow = workspace.Color.LightRow;
        Array.Fill(lightRow, int.MaxValue);
        int last = Math.Min(h - 1, (int)(workspace.Region.VanishingY + (color.LightSourceBelowHorizonFraction * h)));
        byte limit = (byte)Math.Clamp(color.LightSourceLightness, 0, 255);
        Mat gray = workspace.Gradient.Gray;
        byte* grayBase = (byte*)gray.DataPointer;
        long grayStep = gray.Step();
        for (int y = 0; y <= last; y++)
        {
            byte* row = grayBase + (y * grayStep);
            for (int x = 0; x < w; x++)
            {
                if (row[x] >= limit && lightRow[x] == int.MaxValue)
                {
                    lightRow[x] = y;
                }
            }
        }

        int litColumns = 0;
        for (int x = 0; x < w; x++)
        {
            litColumns += lightRow[x] != int.MaxValue ? 1 : 0;
        }

        return litColumns * 4 <= w;
    }

    /// <summary>
    /// Whether an evidence run [start, end] of row <paramref name="y"/> lies below a light source: a column within
    /// max(2, d / 2) pixels of it has a light source (see <see cref="FindLightColumns"/>) above row y. A flat wet road is
    /// a horizontal mirror: the reflection of a light lies on the vertical through the light in a camera without roll
    /// (law of reflection), stretched into a streak by the road's roughness; a lane line crosses such a column in a few
    /// rows only, so it loses little.
    /// </summary>
    private static bool UnderLight(int[] lightRow, int y, int start, int end, int d, int w)
    {
        int margin = Math.Max(2, d / 2);
        for (int k = Math.Max(0, start - margin), kEnd = Math.Min(w - 1, end + margin); k <= kEnd; k++)
        {
            if (lightRow[k] < y)
            {
                return true;
            }
        }

        return false;
    }

    /// <summary>
    /// Clears evidence in and around saturated blobs: runs of blurred grey at or above
    /// <see cref="ColorOptions.SaturatedBlobLightness"/> wider than two marking widths (the sun, its road reflection,
    /// a headlamp's core) are not paint, and their rims pass the ridge test; evidence within two marking widths of such a
    /// run is cleared. Paint is never wider than a marking, so a wider saturated run is light, not a line.
    /// </summary>
    private unsafe void SuppressNearSaturatedBlobs(byte* smooth, byte* ev, int x0, int x1, int d, int w)
    {
        int limit = (int)color.SaturatedBlobLightness;
        int x = x0;
        while (x <= x1)
        {
            if (smooth[x] < limit)
            {
                x++;
                continue;
            }

            int start = x;
            while (x <= x1 && smooth[x] >= limit)
            {
                x++;
            }

            if (x - start > 2 * d)
            {
                int a = Math.Max(0, start - (2 * d)), b = Math.Min(w - 1, x - 1 + (2 * d));
                for (int k = a; k <= b; k++)
                {
                    ev[k] = 0;
                }
            }
        }
    }

    /// <summary>
    /// One pass over the evidence runs of row <paramref name="y"/> (shared by both tests; <paramref name="seen"/> counts
    /// their pixels): a run below a light source is cleared (<see cref="UnderLight"/>, when <paramref name="lightRow"/> is
    /// given); otherwise a run whose local orientation does not point at the vanishing
    /// point is cleared: the structure tensor J = Σ ∇I ∇Iᵀ of the blurred grey image over a window of half size
    /// clamp(d / 2, 2, 6) rows around the row (at most 7 of its rows and 13 of its columns sampled), over the run and two
    /// pixels beyond each end, gives the dominant gradient direction 0.5·atan2(2Jxy, Jxx − Jyy);
    /// the marking runs perpendicular to it. When the coherence (λ1 − λ2) / (λ1 + λ2) is at least
    /// <see cref="GradientOptions.OrientationMinCoherence"/> and the angle to the line through the vanishing point
    /// exceeds <see cref="GradientOptions.OrientationToleranceDeg"/> + <see cref="GradientOptions.OrientationToleranceGrowthDeg"/>
    /// × (distance from the vanishing point / frame height) and the run is turned towards the image vertical, the run
    /// is cleared. Lane markings are straight lines
    /// on the ground, so their images converge on the vanishing point (the tolerance grows with distance for road
    /// curvature and vanishing-point error); specular streaks of lamps on a wet road are image-vertical and fail
    /// away from the vanishing point's column.
    /// </summary>
    /// <returns>The number of evidence pixels cleared.</returns>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private unsafe int ClearRuns(FrameWorkspace workspace, byte* ev, int y, int x0, int x1, int d, int[]? lightRow, out int seen)
    {
        int cleared = 0;
        seen = 0;
        bool orient = gradient.OrientationToleranceDeg < 90;
        int w = workspace.Width, h = workspace.Height, bandTop = workspace.BandTop;
        byte* blurBase = (byte*)workspace.Gradient.Blurred.DataPointer;
        long blurStep = workspace.Gradient.Blurred.Step();
        double vx = workspace.Region.VanishingX, vy = workspace.Region.VanishingY;
        int r = Math.Clamp(d / 2, 2, 6);
        int ya = Math.Max(bandTop + 1, y - r), yb = Math.Min(h - 2, y + r);
        double tolBase = gradient.OrientationToleranceDeg * Math.PI / 180, tolGrowth = gradient.OrientationToleranceGrowthDeg * Math.PI / 180;
        double minCoherence = gradient.OrientationMinCoherence;
        int x = x0;
        while (x <= x1)
        {
            if (ev[x] == 0)
            {
                x++;
                continue;
            }

            int start = x;
            while (x <= x1 && ev[x] != 0)
            {
                x++;
            }

            int end = x - 1, xm = (start + end) / 2;
            seen += end - start + 1;
            if (lightRow is not null && UnderLight(lightRow, y, start, end, d, w))
            {
                for (int k = start; k <= end; k++)
                {
                    ev[k] = 0;
                }

                cleared += end - start + 1;
                continue;
            }

            if (!orient)
            {
                continue;
            }

            // A run can only be cleared when it is turned towards the vertical by more than the tolerance, so its angle
            // to the vanishing-point direction is below twice that direction's angle from the vertical: skip the
            // tensor where even that cannot exceed the tolerance (the result is the same, only cheaper).
            double vpAngle = Math.Atan2(Math.Abs(xm - vx), Math.Max(1e-9, y - vy));
            double tolHere = tolBase + (tolGrowth * Math.Sqrt(((xm - vx) * (xm - vx)) + ((y - vy) * (y - vy))) / h);
            if (2 * vpAngle <= tolHere)
            {
                continue;
            }
            // The window spans the run and both its edges (where the gradients are), sampling at most ~13 columns.
            int xa = Math.Max(1, start - 2), xb = Math.Min(w - 2, end + 2), colStep = Math.Max(1, (xb - xa) / 12), rowStep = Math.Max(1, (yb - ya) / 6);
            // Integer sums (exact, so the same as summing in doubles), converted once.
            long ixx = 0, iyy = 0, ixy = 0;
            for (int yy = ya; yy <= yb; yy += rowStep)
            {
                byte* s = blurBase + ((yy - bandTop) * blurStep);
                byte* up = s - blurStep, down = s + blurStep;
                for (int xx = xa; xx <= xb; xx += colStep)
                {
                    int gx = s[xx + 1] - s[xx - 1], gy = down[xx] - up[xx];
                    ixx += gx * gx;
                    iyy += gy * gy;
                    ixy += gx * gy;
                }
            }

            double jxx = ixx, jyy = iyy, jxy = ixy;

            double trace = jxx + jyy;
            if (trace <= 0)
            {
                continue;
            }

            double diff = Math.Sqrt(((jxx - jyy) * (jxx - jyy)) + (4 * jxy * jxy));
            if (diff / trace < minCoherence)
            {
                continue;
            }

            // Line direction = gradient direction + 90°; compare with the direction to the vanishing point, modulo 180°.
            double line = (0.5 * Math.Atan2(2 * jxy, jxx - jyy)) + (Math.PI / 2);
            double toVp = Math.Atan2(vy - y, vx - xm);
            double delta = Math.Abs(Math.IEEERemainder(line - toVp, Math.PI));
            double dist = Math.Sqrt(((xm - vx) * (xm - vx)) + ((y - vy) * (y - vy))) / h;
            // Only runs turned towards the image vertical are cleared (the reflection signature); runs turned towards
            // the horizontal are ends of worn paint pieces or dashes and are kept.
            double fromVertical = Math.Abs(Math.IEEERemainder(line - (Math.PI / 2), Math.PI));
            double vpFromVertical = Math.Abs(Math.IEEERemainder(toVp - (Math.PI / 2), Math.PI));
            if (fromVertical < vpFromVertical && delta > tolBase + (tolGrowth * dist))
            {
                for (int k = start; k <= end; k++)
                {
                    ev[k] = 0;
                }

                cleared += end - start + 1;
            }
        }

        return cleared;
    }
}
