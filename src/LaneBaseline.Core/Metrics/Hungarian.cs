namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Optimal one-to-one assignment for a rectangular matrix (the Hungarian method, with row/column potentials and
/// shortest augmenting paths), hand-written for the small matrices of lane matching.
/// </summary>
/// <remarks>
/// <para>Rows are assigned to distinct columns (or columns to rows when there are more rows), so
/// min(rows, cols) pairs are made. Ties are broken deterministically: the lowest column index wins when two
/// augmenting paths have equal cost. O(n²m) time.</para>
/// <para>References: [1] H. W. Kuhn, "The Hungarian method for the assignment problem", Naval Research Logistics
/// Quarterly 2, 1955, DOI 10.1002/nav.3800020109. [2] J. Munkres, "Algorithms for the assignment and transportation
/// problems", J. SIAM 5(1), 1957, DOI 10.1137/0105003.</para>
/// </remarks>
public static class Hungarian
{
    /// <summary>Assignment maximising the total of <paramref name="values"/> (row-major, rows x cols).</summary>
    /// <returns>For each row, the assigned column or -1.</returns>
    public static int[] Maximize(ReadOnlySpan<double> values, int rows, int cols)
    {
        double max = 0;
        foreach (double v in values)
        {
            max = Math.Max(max, v);
        }

        var cost = new double[values.Length];
        for (int i = 0; i < values.Length; i++)
        {
            cost[i] = max - values[i];
        }

        return Minimize(cost, rows, cols);
    }

    /// <summary>Assignment minimising the total of <paramref name="cost"/> (row-major, rows x cols).</summary>
    /// <returns>For each row, the assigned column or -1.</returns>
    public static int[] Minimize(ReadOnlySpan<double> cost, int rows, int cols)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(rows);
        ArgumentOutOfRangeException.ThrowIfNegative(cols);
        if (cost.Length != rows * cols)
        {
            throw new ArgumentException("cost must hold rows*cols values", nameof(cost));
        }

        var result = new int[rows];
        Array.Fill(result, -1);
        if (rows == 0 || cols == 0)
        {
            return result;
        }

        if (rows <= cols)
        {
            int[] rowToCol = SolveRowsNotMoreThanCols(cost, rows, cols, transposed: false);
            Array.Copy(rowToCol, result, rows);
        }
        else
        {
            // Solve the transpose (cols rows of rows columns) and invert the mapping.
            int[] colToRow = SolveRowsNotMoreThanCols(cost, cols, rows, transposed: true);
            for (int c = 0; c < cols; c++)
            {
                result[colToRow[c]] = c;
            }
        }

        return result;
    }

    /// <summary>Total of <paramref name="values"/> over an assignment.</summary>
    public static double Total(ReadOnlySpan<double> values, int cols, ReadOnlySpan<int> rowToCol)
    {
        double sum = 0;
        for (int r = 0; r < rowToCol.Length; r++)
        {
            if (rowToCol[r] >= 0)
            {
                sum += values[(r * cols) + rowToCol[r]];
            }
        }

        return sum;
    }

    // n <= m. Potentials u (rows), v (cols); p[j] = row assigned to column j (1-based, 0 = none).
    private static int[] SolveRowsNotMoreThanCols(ReadOnlySpan<double> cost, int n, int m, bool transposed)
    {
        var u = new double[n + 1];
        var v = new double[m + 1];
        var p = new int[m + 1];
        var way = new int[m + 1];
        var minv = new double[m + 1];
        var used = new bool[m + 1];
        for (int i = 1; i <= n; i++)
        {
            p[0] = i;
            int j0 = 0;
            Array.Fill(minv, double.PositiveInfinity);
            Array.Fill(used, false);
            do
            {
                used[j0] = true;
                int i0 = p[j0];
                double delta = double.PositiveInfinity;
                int j1 = 0;
                for (int j = 1; j <= m; j++)
                {
                    if (used[j])
                    {
                        continue;
                    }

                    double c = transposed ? cost[((j - 1) * n) + (i0 - 1)] : cost[((i0 - 1) * m) + (j - 1)];
                    double cur = c - u[i0] - v[j];
                    if (cur < minv[j])
                    {
                        minv[j] = cur;
                        way[j] = j0;
                    }

                    if (minv[j] < delta)
                    {
                        delta = minv[j];
                        j1 = j;
                    }
                }

                for (int j = 0; j <= m; j++)
                {
                    if (used[j])
                    {
                        u[p[j]] += delta;
                        v[j] -= delta;
                    }
                    else
                    {
                        minv[j] -= delta;
                    }
                }

                j0 = j1;
            }
            while (p[j0] != 0);

            do
            {
                int j1 = way[j0];
                p[j0] = p[j1];
                j0 = j1;
            }
            while (j0 != 0);
        }

        var rowToCol = new int[n];
        Array.Fill(rowToCol, -1);
        for (int j = 1; j <= m; j++)
        {
            if (p[j] != 0)
            {
                rowToCol[p[j] - 1] = j - 1;
            }
        }

        return rowToCol;
    }
}
