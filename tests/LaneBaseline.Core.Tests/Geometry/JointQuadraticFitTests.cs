using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Random;
using LaneBaseline.Core.Results;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace LaneBaseline.Core.Tests.Geometry;

public sealed class JointQuadraticFitTests
{
    [Fact]
    public void SharedLine_TwoGroups_MatchesTheHandWorkedLeastSquares()
    {
        // Source: hand-worked least squares (normal equations), derivation:
        // group 0: (y, x) = (0, 1), (1, 3); group 1: (0, 10), (1, 12), (2, 15); model x = B*y + C_g, weights 1.
        // For fixed B the offsets are the group means: C0 = 2 - B/2, C1 = 37/3 - B. The residual sum is
        // 2(1 - B/2)^2 + (B - 7/3)^2 + 1/9 + (8/3 - B)^2, whose derivative 5B - 12 vanishes at B = 12/5.
        // So B = 2.4, C0 = 0.8, C1 = 149/15.
        double[] ys = [0, 1, 0, 1, 2];
        double[] xs = [1, 3, 10, 12, 15];
        double[] ws = [1, 1, 1, 1, 1];
        int[] groups = [0, 0, 1, 1, 1];
        var fits = new Quadratic[2];
        Assert.True(JointQuadraticFit.TryFit(xs, ys, ws, groups, default, 2, line: true, yScale: 1, fits));
        Assert.Equal(0, fits[0].A);
        Assert.Equal(2.4, fits[0].B, 12);
        Assert.Equal(2.4, fits[1].B, 12);
        Assert.Equal(0.8, fits[0].C, 12);
        Assert.Equal(149.0 / 15, fits[1].C, 12);
    }

    [Fact]
    public void ExactSharedQuadratic_IsRecovered_AndTheScaleDoesNotMatter()
    {
        // Source: common practice (a least-squares fit reproduces data that lie exactly on the model).
        // Three boundaries 80 px apart sharing A = 2e-4, B = -0.05, rows 0..300 step 25.
        var ys = new List<double>();
        var xs = new List<double>();
        var gs = new List<int>();
        for (int g = 0; g < 3; g++)
        {
            for (int y = 0; y <= 300; y += 25)
            {
                ys.Add(y);
                xs.Add((2e-4 * y * y) - (0.05 * y) + 100 + (80 * g));
                gs.Add(g);
            }
        }

        double[] ws = [.. Enumerable.Repeat(1.0, ys.Count)];
        var fits = new Quadratic[3];
        foreach (double scale in new[] { 1.0, 320.0 })
        {
            Assert.True(JointQuadraticFit.TryFit([.. xs], [.. ys], ws, [.. gs], default, 3, line: false, scale, fits));
            for (int g = 0; g < 3; g++)
            {
                Assert.Equal(2e-4, fits[g].A, 10);
                Assert.Equal(-0.05, fits[g].B, 8);
                Assert.Equal(100 + (80 * g), fits[g].C, 6);
            }
        }
    }

    [Fact]
    public void WeightedNoisyQuadratic_AgreesWithMathNetQr()
    {
        // Source: MathNet.Numerics 5.0 QR least squares on the sqrt(w)-scaled design matrix [y^2, y, one-hot(group)]
        // (weighted least squares, common practice) as the outside oracle.
        var rng = new SplitMix64(21);
        for (int trial = 0; trial < 20; trial++)
        {
            int groupsCount = 2 + rng.NextInt(3), n = 0;
            var xs = new List<double>();
            var ys = new List<double>();
            var ws = new List<double>();
            var gs = new List<int>();
            var use = new List<bool>();
            for (int g = 0; g < groupsCount; g++)
            {
                int points = 3 + rng.NextInt(8);
                for (int p = 0; p < points; p++)
                {
                    double y = rng.NextDouble(0, 400);
                    xs.Add((1e-4 * y * y) + (0.1 * y) + (90 * g) + rng.NextDouble(-5, 5));
                    ys.Add(y);
                    ws.Add(rng.NextDouble(0.5, 40));
                    gs.Add(g);
                    use.Add(p == 0 || rng.NextDouble() < 0.85); // the first point keeps every group present
                    n++;
                }
            }

            var fits = new Quadratic[groupsCount];
            Assert.True(JointQuadraticFit.TryFit([.. xs], [.. ys], [.. ws], [.. gs], [.. use], groupsCount, line: false, 400, fits));

            var rows = new List<double[]>();
            var rhs = new List<double>();
            for (int i = 0; i < n; i++)
            {
                if (!use[i])
                {
                    continue;
                }

                double s = Math.Sqrt(ws[i]);
                var row = new double[2 + groupsCount];
                row[0] = s * ys[i] * ys[i];
                row[1] = s * ys[i];
                row[2 + gs[i]] = s;
                rows.Add(row);
                rhs.Add(s * xs[i]);
            }

            Matrix<double> a = Matrix<double>.Build.DenseOfRowArrays(rows);
            Vector<double> theta = a.QR().Solve(Vector<double>.Build.DenseOfEnumerable(rhs));
            for (int g = 0; g < groupsCount; g++)
            {
                Assert.Equal(theta[0], fits[g].A, 9);
                Assert.Equal(theta[1], fits[g].B, 6);
                Assert.Equal(theta[2 + g], fits[g].C, 4);
            }
        }
    }

    [Fact]
    public void AGroupWithoutPoints_IsRejected()
    {
        // Source: common practice (an offset with no observation is not determined).
        double[] ys = [0, 1, 2];
        double[] xs = [1, 2, 3];
        double[] ws = [1, 1, 1];
        int[] groups = [0, 0, 0];
        var fits = new Quadratic[2];
        Assert.False(JointQuadraticFit.TryFit(xs, ys, ws, groups, default, 2, line: true, 1, fits));
        Assert.True(JointQuadraticFit.TryFit(xs, ys, ws, groups, default, 1, line: true, 1, fits));
        Assert.Equal(1, fits[0].B, 12);
    }
}
