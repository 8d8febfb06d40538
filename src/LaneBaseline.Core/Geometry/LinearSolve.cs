namespace LaneBaseline.Core.Geometry;

/// <summary>Gaussian elimination with partial pivoting on a small augmented matrix, in place, without allocating.</summary>
public static class LinearSolve
{
    /// <summary>Solves the n×(n+1) augmented row-major system <paramref name="m"/>; false when singular.</summary>
    public static bool TrySolve(Span<double> m, int n, Span<double> x)
    {
        int w = n + 1;
        for (int col = 0; col < n; col++)
        {
            int pivot = col;
            double best = Math.Abs(m[(col * w) + col]);
            for (int r = col + 1; r < n; r++)
            {
                double v = Math.Abs(m[(r * w) + col]);
                if (v > best)
                {
                    best = v;
                    pivot = r;
                }
            }

            if (best < 1e-12)
            {
                return false;
            }

            if (pivot != col)
            {
                for (int c = 0; c < w; c++)
                {
                    (m[(col * w) + c], m[(pivot * w) + c]) = (m[(pivot * w) + c], m[(col * w) + c]);
                }
            }

            double p = m[(col * w) + col];
            for (int r = col + 1; r < n; r++)
            {
                double factor = m[(r * w) + col] / p;
                if (factor == 0)
                {
                    continue;
                }

                for (int c = col; c < w; c++)
                {
                    m[(r * w) + c] -= factor * m[(col * w) + c];
                }
            }
        }

        for (int r = n - 1; r >= 0; r--)
        {
            double s = m[(r * w) + n];
            for (int c = r + 1; c < n; c++)
            {
                s -= m[(r * w) + c] * x[c];
            }

            x[r] = s / m[(r * w) + r];
        }

        return true;
    }
}
