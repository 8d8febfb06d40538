using LaneBaseline.Core.Results;

namespace LaneBaseline.Core.Geometry;

/// <summary>
/// Weighted least-squares fit of several curves that share their shape: x = A·y² + B·y + C_g for every group g
/// (one group per lane boundary), i.e. boundaries of one road with a common heading and curvature and their own
/// lateral offsets. Normal equations of the G + 2 unknowns (A, B, C_0 … C_{G−1}), solved by
/// <see cref="LinearSolve"/>, with y divided by a caller-given scale for conditioning; no allocation.
/// </summary>
public static class JointQuadraticFit
{
    /// <summary>Most groups one fit takes.</summary>
    public const int MaxGroups = 8;

    /// <summary>
    /// Fits the shared curve over the points selected by <paramref name="use"/> (all when empty); false when a group
    /// has no selected point or the system is singular (e.g. fewer than three distinct rows for a quadratic).
    /// </summary>
    /// <param name="xs">x values.</param>
    /// <param name="ys">y values.</param>
    /// <param name="ws">weights (≥ 0; a point of weight 0 is ignored).</param>
    /// <param name="groups">group of each point, 0 … <paramref name="groupCount"/> − 1.</param>
    /// <param name="use">selection mask, or empty for all points.</param>
    /// <param name="groupCount">number of groups (1 … <see cref="MaxGroups"/>).</param>
    /// <param name="line">true to fix A = 0 (shared heading only).</param>
    /// <param name="yScale">scale dividing y before fitting (e.g. the image height).</param>
    /// <param name="fits">receives each group's curve in the caller's (unscaled) coordinates; same A and B for all.</param>
    public static bool TryFit(
        ReadOnlySpan<double> xs,
        ReadOnlySpan<double> ys,
        ReadOnlySpan<double> ws,
        ReadOnlySpan<int> groups,
        ReadOnlySpan<bool> use,
        int groupCount,
        bool line,
        double yScale,
        Span<Quadratic> fits)
    {
        if (groupCount < 1 || groupCount > MaxGroups || fits.Length < groupCount)
        {
            throw new ArgumentOutOfRangeException(nameof(groupCount), groupCount, "1 to " + MaxGroups + " groups, and room for each fit");
        }

        // Unknowns: [A,] B, C_0 … C_{G-1}; design row (y², y, e_g) or (y, e_g).
        int shape = line ? 1 : 2;
        int n = shape + groupCount, w = n + 1;
        Span<double> m = stackalloc double[(MaxGroups + 2) * (MaxGroups + 3)];
        m.Clear();
        Span<int> perGroup = stackalloc int[MaxGroups];
        perGroup.Clear();
        Span<double> phi = stackalloc double[2];
        for (int i = 0; i < xs.Length; i++)
        {
            if ((!use.IsEmpty && !use[i]) || ws[i] <= 0)
            {
                continue;
            }

            double wt = ws[i], y = ys[i] / yScale, x = xs[i];
            int g = groups[i];
            perGroup[g]++;
            phi[0] = line ? y : y * y;
            phi[1] = y;
            int cg = shape + g;

            // Shape-by-shape block.
            for (int r = 0; r < shape; r++)
            {
                for (int c = 0; c < shape; c++)
                {
                    m[(r * w) + c] += wt * phi[r] * phi[c];
                }

                m[(r * w) + cg] += wt * phi[r];
                m[(cg * w) + r] += wt * phi[r];
                m[(r * w) + n] += wt * phi[r] * x;
            }

            m[(cg * w) + cg] += wt;
            m[(cg * w) + n] += wt * x;
        }

        for (int g = 0; g < groupCount; g++)
        {
            if (perGroup[g] == 0)
            {
                return false;
            }
        }

        Span<double> sol = stackalloc double[MaxGroups + 2];
        if (!LinearSolve.TrySolve(m[..(n * w)], n, sol))
        {
            return false;
        }

        double a = line ? 0 : sol[0] / (yScale * yScale);
        double b = sol[shape - 1] / yScale;
        for (int g = 0; g < groupCount; g++)
        {
            fits[g] = new Quadratic(a, b, sol[shape + g]);
        }

        return true;
    }
}
