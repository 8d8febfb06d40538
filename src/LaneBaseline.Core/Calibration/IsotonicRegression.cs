namespace LaneBaseline.Core.Calibration;

/// <summary>
/// Least-squares isotonic (non-decreasing) regression by pool-adjacent-violators, and its piecewise-linear
/// interpolation between the fitted points (constant beyond the ends).
/// </summary>
/// <remarks>
/// Reference: B. Zadrozny and C. Elkan, "Transforming classifier scores into accurate multiclass probability
/// estimates", KDD 2002 (isotonic regression of scores onto outcomes by pair-adjacent violators); M. Ayer et al.,
/// "An empirical distribution function for sampling with incomplete information", Ann. Math. Statist. 26, 1955.
/// </remarks>
public static class IsotonicRegression
{
    /// <summary>Fits y against x (weights 1). Ties in x are pooled first. Returns the knots: distinct x, fitted y.</summary>
    /// <param name="x">Inputs (any order).</param>
    /// <param name="y">Targets.</param>
    public static (double[] X, double[] Y) Fit(IReadOnlyList<double> x, IReadOnlyList<double> y)
    {
        ArgumentNullException.ThrowIfNull(x);
        ArgumentNullException.ThrowIfNull(y);
        if (x.Count != y.Count)
        {
            throw new ArgumentException("x and y differ in length", nameof(y));
        }

        int[] order = [.. Enumerable.Range(0, x.Count).OrderBy(i => x[i]).ThenBy(i => i)];

        // Pool equal x into one point of weight = count (the fit is then a function of x).
        var px = new List<double>();
        var sum = new List<double>();
        var weight = new List<double>();
        foreach (int i in order)
        {
            if (px.Count > 0 && px[^1] == x[i])
            {
                sum[^1] += y[i];
                weight[^1] += 1;
            }
            else
            {
                px.Add(x[i]);
                sum.Add(y[i]);
                weight.Add(1);
            }
        }

        // Pool adjacent violators: a stack of blocks (mean, weight, point count).
        var mean = new List<double>();
        var bw = new List<double>();
        var len = new List<int>();
        for (int i = 0; i < px.Count; i++)
        {
            mean.Add(sum[i] / weight[i]);
            bw.Add(weight[i]);
            len.Add(1);
            while (mean.Count > 1 && mean[^2] > mean[^1])
            {
                double w = bw[^2] + bw[^1];
                double m = ((mean[^2] * bw[^2]) + (mean[^1] * bw[^1])) / w;
                int l = len[^2] + len[^1];
                mean.RemoveAt(mean.Count - 1);
                bw.RemoveAt(bw.Count - 1);
                len.RemoveAt(len.Count - 1);
                mean[^1] = m;
                bw[^1] = w;
                len[^1] = l;
            }
        }

        var fy = new double[px.Count];
        int k = 0;
        for (int b = 0; b < mean.Count; b++)
        {
            for (int j = 0; j < len[b]; j++)
            {
                fy[k++] = mean[b];
            }
        }

        return ([.. px], fy);
    }

    /// <summary>Evaluates the fitted step points at <paramref name="v"/>: linear between knots, the end values outside.</summary>
    public static double Interpolate(ReadOnlySpan<double> xs, ReadOnlySpan<double> ys, double v)
    {
        if (xs.Length == 0)
        {
            return v;
        }

        if (v <= xs[0])
        {
            return ys[0];
        }

        if (v >= xs[^1])
        {
            return ys[^1];
        }

        int hi = xs.BinarySearch(v);
        if (hi >= 0)
        {
            return ys[hi];
        }

        hi = ~hi;
        int lo = hi - 1;
        double t = (v - xs[lo]) / (xs[hi] - xs[lo]);
        return ys[lo] + (t * (ys[hi] - ys[lo]));
    }
}
