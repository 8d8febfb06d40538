using CsCheck;
using LaneBaseline.Core.Metrics;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class HungarianTests
{
    // Source: scipy.optimize.linear_sum_assignment documentation example:
    // cost [[4,1,3],[2,0,5],[3,2,2]] -> rows 0,1,2 to columns 1,0,2, total cost 5 (also checked by brute force below).
    [Fact]
    public void Minimize_ScipyDocumentationExample_GivesCost5()
    {
        double[] cost = [4, 1, 3, 2, 0, 5, 3, 2, 2];
        int[] a = Hungarian.Minimize(cost, 3, 3);
        Assert.Equal([1, 0, 2], a);
        Assert.Equal(5, Hungarian.Total(cost, 3, a));
        Assert.Equal(BruteForceMin(cost, 3, 3), Hungarian.Total(cost, 3, a));
    }

    // Source: common textbook 4x4 example (from memory), verified here by brute force: (0->2, 1->1, 2->0, 3->3), cost 140.
    [Fact]
    public void Minimize_TextbookExample_GivesCost140()
    {
        double[] cost = [82, 83, 69, 92, 77, 37, 49, 92, 11, 69, 5, 86, 8, 9, 98, 23];
        int[] a = Hungarian.Minimize(cost, 4, 4);
        Assert.Equal([2, 1, 0, 3], a);
        Assert.Equal(140, Hungarian.Total(cost, 4, a));
        Assert.Equal(140, BruteForceMin(cost, 4, 4));
    }

    // Oracle: exhaustive search over all injective assignments (brute force), on random rectangular matrices.
    [Fact]
    public void Maximize_RandomRectangular_EqualsBruteForce()
    {
        Gen.Select(Gen.Int[0, 5], Gen.Int[0, 5])
            .SelectMany((r, c) => Gen.Double[0, 1].Array[r * c].Select(v => (r, c, v)))
            .Sample(t =>
            {
                (int rows, int cols, double[] v) = t;
                int[] a = Hungarian.Maximize(v, rows, cols);
                Assert.Equal(rows, a.Length);
                Assert.Equal(Math.Min(rows, cols), a.Count(x => x >= 0));
                Assert.Equal(a.Where(x => x >= 0).Count(), a.Where(x => x >= 0).Distinct().Count());
                double best = -BruteForceMin([.. v.Select(x => -x)], rows, cols);
                Assert.Equal(best, Hungarian.Total(v, cols, a), 9);
            }, iter: 500);
    }

    private static double BruteForceMin(double[] cost, int rows, int cols)
    {
        double best = double.PositiveInfinity;
        void Go(int r, bool[] usedCols, bool[] usedRows, double sum, int made)
        {
            int target = Math.Min(rows, cols);
            if (made == target)
            {
                best = Math.Min(best, sum);
                return;
            }

            if (r == rows)
            {
                return;
            }

            // Row r either takes a free column, or (when rows > cols) stays unassigned.
            for (int c = 0; c < cols; c++)
            {
                if (!usedCols[c])
                {
                    usedCols[c] = true;
                    Go(r + 1, usedCols, usedRows, sum + cost[(r * cols) + c], made + 1);
                    usedCols[c] = false;
                }
            }

            if (rows - r - 1 >= target - made)
            {
                Go(r + 1, usedCols, usedRows, sum, made);
            }
        }

        Go(0, new bool[cols], new bool[rows], 0, 0);
        return rows == 0 || cols == 0 ? 0 : best;
    }
}
