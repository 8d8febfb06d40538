using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// Matches the lanes of two frames (shared by <c>LBA-T01</c> and <c>LBA-T02</c>): a Hungarian assignment on the lateral
/// distance at each pair's nearest common row where the lane width can be measured (two lanes of either frame on that
/// row), gated at a fraction of that width in pixels. Slots are not used: they are renumbered when the vehicle changes
/// lanes.
/// </summary>
internal static class LaneMatching
{
    /// <summary>Matched pairs: (index in a, index in b, x_b - x_a at the row, row).</summary>
    public static List<(int I, int J, double Dx, double Row)> Match(IReadOnlyList<Lane> a, IReadOnlyList<Lane> b, double gateLaneWidths)
    {
        var result = new List<(int, int, double, double)>();
        if (a.Count == 0 || b.Count == 0)
        {
            return result;
        }

        // For each pair: the nearest common row where the lane width can be measured (two lanes of either frame).
        var dx = new double[a.Count * b.Count];
        var rows = new double[a.Count * b.Count];
        var widths = new double[a.Count * b.Count];
        var ok = new bool[a.Count * b.Count];
        for (int i = 0; i < a.Count; i++)
        {
            for (int j = 0; j < b.Count; j++)
            {
                (double lo, double hi) = LaneSampling.Common(a[i], b[j], double.NegativeInfinity);
                for (double row = Math.Floor(hi); row >= lo; row -= 5)
                {
                    double? w = LaneSampling.LaneWidthPxAt(b, row) ?? LaneSampling.LaneWidthPxAt(a, row);
                    if (w is double ww && LaneSampling.XAt(a[i], row, out double xa) && LaneSampling.XAt(b[j], row, out double xb))
                    {
                        int k = (i * b.Count) + j;
                        dx[k] = xb - xa;
                        rows[k] = row;
                        widths[k] = ww;
                        ok[k] = true;
                        break;
                    }
                }
            }
        }

        const double Far = 1e9;
        var cost = new double[a.Count * b.Count];
        var gate = new double[a.Count * b.Count];
        for (int k = 0; k < cost.Length; k++)
        {
            gate[k] = ok[k] ? gateLaneWidths * widths[k] : 0;
            cost[k] = ok[k] && Math.Abs(dx[k]) < gate[k] ? Math.Abs(dx[k]) : Far;
        }

        int[] assign = Hungarian.Minimize(cost, a.Count, b.Count);
        for (int i = 0; i < a.Count; i++)
        {
            int j = assign[i];
            if (j >= 0 && cost[(i * b.Count) + j] < Far)
            {
                result.Add((i, j, dx[(i * b.Count) + j], rows[(i * b.Count) + j]));
            }
        }

        return result;
    }
}
