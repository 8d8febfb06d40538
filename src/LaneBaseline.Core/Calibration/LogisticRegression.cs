namespace LaneBaseline.Core.Calibration;

/// <summary>
/// L2-regularised logistic regression of a binary outcome on a few features, fitted by Newton's method (iteratively
/// reweighted least squares). The intercept is not penalised.
/// </summary>
/// <remarks>
/// Minimises −Σ [yᵢ·log pᵢ + (1−yᵢ)·log(1−pᵢ)] + (λ/2)·‖w‖², pᵢ = σ(b + w·xᵢ). Newton step: solve
/// (XᵀSX + λI′)·Δ = Xᵀ(y − p) − λw′ with S = diag(pᵢ(1−pᵢ)) and the intercept row unpenalised.
/// Reference: J. Platt, "Probabilistic outputs for support vector machines and comparisons to regularized likelihood
/// methods", 1999 (a sigmoid fitted to one score; here generalised to several features); IRLS: P. McCullagh and
/// J. A. Nelder, Generalized Linear Models, 2nd ed., 1989, Sec. 2.5.
/// </remarks>
public static class LogisticRegression
{
    /// <summary>Fits the model.</summary>
    /// <param name="x">Rows of features (already standardised by the caller when wanted).</param>
    /// <param name="y">Outcomes, 0 or 1.</param>
    /// <param name="lambda">L2 penalty on the feature weights (≥ 0).</param>
    /// <returns>Intercept and weights (one per feature).</returns>
    public static (double Intercept, double[] Weights) Fit(IReadOnlyList<double[]> x, IReadOnlyList<double> y, double lambda)
    {
        ArgumentNullException.ThrowIfNull(x);
        ArgumentNullException.ThrowIfNull(y);
        int n = x.Count, d = n == 0 ? 0 : x[0].Length, m = d + 1;
        var beta = new double[m]; // [b, w1..wd]
        var g = new double[m];
        var hm = new double[m * m];
        var step = new double[m];
        for (int iter = 0; iter < 100; iter++)
        {
            Array.Clear(g);
            Array.Clear(hm);
            for (int i = 0; i < n; i++)
            {
                double z = beta[0];
                for (int k = 0; k < d; k++)
                {
                    z += beta[k + 1] * x[i][k];
                }

                double p = Sigmoid(z), s = p * (1 - p), r = y[i] - p;
                for (int a = 0; a < m; a++)
                {
                    double xa = a == 0 ? 1 : x[i][a - 1];
                    g[a] += xa * r;
                    for (int b = 0; b <= a; b++)
                    {
                        double xb = b == 0 ? 1 : x[i][b - 1];
                        hm[(a * m) + b] += s * xa * xb;
                    }
                }
            }

            for (int a = 1; a < m; a++)
            {
                g[a] -= lambda * beta[a];
                hm[(a * m) + a] += lambda;
            }

            for (int a = 0; a < m; a++)
            {
                hm[(a * m) + a] += 1e-9; // keeps the system positive definite when a feature is constant
                for (int b = a + 1; b < m; b++)
                {
                    hm[(a * m) + b] = hm[(b * m) + a];
                }
            }

            Cholesky.Solve(hm, g, step, m);
            double change = 0;
            for (int a = 0; a < m; a++)
            {
                beta[a] += step[a];
                change = Math.Max(change, Math.Abs(step[a]));
            }

            if (change < 1e-10)
            {
                break;
            }
        }

        return (beta[0], beta[1..]);
    }

    /// <summary>The logistic function 1 / (1 + e^−z), computed without overflow.</summary>
    public static double Sigmoid(double z) => z >= 0 ? 1 / (1 + Math.Exp(-z)) : Math.Exp(z) / (1 + Math.Exp(z));

    private static class Cholesky
    {
        // Solves A·x = b for a symmetric positive definite m×m A (row-major), overwriting A with its factor.
        public static void Solve(double[] a, double[] b, double[] x, int m)
        {
            for (int j = 0; j < m; j++)
            {
                double s = a[(j * m) + j];
                for (int k = 0; k < j; k++)
                {
                    s -= a[(j * m) + k] * a[(j * m) + k];
                }

                double l = Math.Sqrt(Math.Max(s, 1e-300));
                a[(j * m) + j] = l;
                for (int i = j + 1; i < m; i++)
                {
                    double t = a[(i * m) + j];
                    for (int k = 0; k < j; k++)
                    {
                        t -= a[(i * m) + k] * a[(j * m) + k];
                    }

                    a[(i * m) + j] = t / l;
                }
            }

            for (int i = 0; i < m; i++)
            {
                double t = b[i];
                for (int k = 0; k < i; k++)
                {
                    t -= a[(i * m) + k] * x[k];
                }

                x[i] = t / a[(i * m) + i];
            }

            for (int i = m - 1; i >= 0; i--)
            {
                double t = x[i];
                for (int k = i + 1; k < m; k++)
                {
                    t -= a[(k * m) + i] * x[k];
                }

                x[i] = t / a[(i * m) + i];
            }
        }
    }
}
