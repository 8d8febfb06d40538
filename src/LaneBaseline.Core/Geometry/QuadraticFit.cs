using LaneBaseline.Core.Results;

namespace LaneBaseline.Core.Geometry;

/// <summary>
/// Weighted least-squares fits of x = A·y² + B·y + C (and of a line x = B·y + C) from the normal equations,
/// with y normalised to [0, 1] by a caller-given scale for conditioning; no allocation.
/// </summary>
public static class QuadraticFit
{
    /// <summary>Weighted quadratic fit over the points selected by <paramref name="use"/> (all when empty).</summary>
    /// <param name="xs">x values.</param>
    /// <param name="ys">y values.</param>
    /// <param name="ws">weights (≥ 0).</param>
    /// <param name="use">selection mask, or empty for all points.</param>
    /// <param name="yScale">scale dividing y before fitting (e.g. the image height).</param>
    /// <param name="fit">the curve in the caller's (unscaled) coordinates.</param>
    public static bool TryFit(ReadOnlySpan<double> xs, ReadOnlySpan<double> ys, ReadOnlySpan<double> ws, ReadOnlySpan<bool> use, double yScale, out Quadratic fit)
    {
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0;
        int n = 0;
        for (int i = 0; i < xs.Length; i++)
        {
            if ((!use.IsEmpty && !use[i]) || ws[i] <= 0)
            {
                continue;
            }

            double w = ws[i], y = ys[i] / yScale, x = xs[i], y2 = y * y;
            s0 += w; s1 += w * y; s2 += w * y2; s3 += w * y2 * y; s4 += w * y2 * y2;
            t0 += w * x; t1 += w * x * y; t2 += w * x * y2;
            n++;
        }

        fit = default;
        if (n < 3)
        {
            return false;
        }

        Span<double> m = stackalloc double[12];
        m[0] = s4; m[1] = s3; m[2] = s2; m[3] = t2;
        m[4] = s3; m[5] = s2; m[6] = s1; m[7] = t1;
        m[8] = s2; m[9] = s1; m[10] = s0; m[11] = t0;
        Span<double> c = stackalloc double[3];
        if (!LinearSolve.TrySolve(m, 3, c))
        {
            return false;
        }

        fit = new Quadratic(c[0] / (yScale * yScale), c[1] / yScale, c[2]);
        return true;
    }

    /// <summary>Weighted straight-line fit x = B·y + C over the selected points.</summary>
    public static bool TryFitLine(ReadOnlySpan<double> xs, ReadOnlySpan<double> ys, ReadOnlySpan<double> ws, ReadOnlySpan<bool> use, double yScale, out Quadratic fit)
    {
        double s0 = 0, s1 = 0, s2 = 0, t0 = 0, t1 = 0;
        int n = 0;
        for (int i = 0; i < xs.Length; i++)
        {
            if ((!use.IsEmpty && !use[i]) || ws[i] <= 0)
            {
                continue;
            }

            double w = ws[i], y = ys[i] / yScale, x = xs[i];
            s0 += w; s1 += w * y; s2 += w * y * y; t0 += w * x; t1 += w * x * y;
            n++;
        }

        fit = default;
        double det = (s2 * s0) - (s1 * s1);
        if (n < 2 || Math.Abs(det) < 1e-12)
        {
            return false;
        }

        double b = ((t1 * s0) - (s1 * t0)) / det;
        double c = ((s2 * t0) - (s1 * t1)) / det;
        fit = new Quadratic(0, b / yScale, c);
        return true;
    }
}
