using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I05</c> near duplicate: two lanes lie on top of each other — the median |dx| over their common rows (sampled
/// every 2 rows, at least half the shorter lane) is under the metric lane width round(30·W/1640).
/// </summary>
public sealed class NearDuplicateRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.NearDuplicate, "near-duplicate", AuditSeverity.Warning, "median |dx| under the metric lane width round(30*width/1640) over at least half the shorter lane",
        "docs/metrics.md: two lanes closer than one rasterised lane width overlap heavily in the IoU metric (derived)");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = frame.Lanes;

        // Only pairs whose x-extents come within dupPx of each other can have a median gap under dupPx (every sampled x
        // lies within its lane's point extent), so the pairs are swept in x order and then checked in (i, j) order:
        // the same findings in the same order as checking every pair.
        double dupPx = Math.Max(1, Math.Round(30.0 * frame.Width / 1640.0, MidpointRounding.ToEven));
        foreach ((int i, int j) in PairsWithinX(lanes, dupPx))
        {
            (double lo, double hi) = LaneSampling.Common(lanes[i], lanes[j], double.NegativeInfinity);
            (double ilo, double ihi) = LaneSampling.Extent(lanes[i]);
            (double jlo, double jhi) = LaneSampling.Extent(lanes[j]);
            double shorter = Math.Min(ihi - ilo, jhi - jlo);
            if (hi - lo < 0.5 * shorter || hi - lo <= 0)
            {
                continue;
            }

            var dx = new List<double>();
            for (double y = Math.Floor(hi); y >= lo; y -= 2)
            {
                if (LaneSampling.XAt(lanes[i], y, out double xi) && LaneSampling.XAt(lanes[j], y, out double xj))
                {
                    dx.Add(Math.Abs(xi - xj));
                }
            }

            if (dx.Count == 0)
            {
                continue;
            }

            dx.Sort();
            double median = dx[dx.Count / 2];
            if (median < dupPx)
            {
                sink.Add(frame.Finding(this, j, i, median, dupPx, "px", Inv($"lane {j} runs {median:0.#} px from lane {i} (median over common rows)")));
            }
        }
    }

    /// <summary>
    /// The pairs (i &lt; j) whose point x-extents are closer than <paramref name="gapPx"/>, in (i, j) order: a sweep over
    /// the lanes sorted by their smallest x, so far-apart lanes cost nothing (Shamos and Hoey 1976, sweep-line pair search).
    /// </summary>
    internal static List<(int I, int J)> PairsWithinX(IReadOnlyList<Lane> lanes, double gapPx)
    {
        int n = lanes.Count;
        var lo = new double[n];
        var hi = new double[n];
        var order = new int[n];
        for (int k = 0; k < n; k++)
        {
            double a = double.PositiveInfinity, b = double.NegativeInfinity;
            foreach (LanePoint p in lanes[k].Points)
            {
                a = Math.Min(a, p.X);
                b = Math.Max(b, p.X);
            }

            (lo[k], hi[k], order[k]) = (a, b, k);
        }

        Array.Sort(order, (a, b) => lo[a] != lo[b] ? lo[a].CompareTo(lo[b]) : a.CompareTo(b));
        var pairs = new List<(int, int)>();
        for (int s = 0; s < n; s++)
        {
            int a = order[s];
            for (int t = s + 1; t < n && lo[order[t]] - hi[a] < gapPx; t++)
            {
                int b = order[t];
                pairs.Add(a < b ? (a, b) : (b, a));
            }
        }

        pairs.Sort();
        return pairs;
    }
}
