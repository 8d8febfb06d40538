using System.Globalization;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// The image-geometry rules (<c>LBA-I01</c> … <c>LBA-I07</c>) on one frame. Pixel coordinates: x right, y down.
/// Pure and thread-safe.
/// </summary>
public static class ImageRules
{
    /// <summary>Checks one frame; findings are appended in rule order.</summary>
    /// <param name="record">The frame's lanes.</param>
    /// <param name="ordinal">Position of the frame in its file.</param>
    /// <param name="width">Frame width, px.</param>
    /// <param name="height">Frame height, px.</param>
    /// <param name="settings">Limits.</param>
    /// <param name="sink">Receives findings.</param>
    public static void Check(LaneRecord record, long ordinal, int width, int height, AuditSettings settings, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(record);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(sink);
        int start = sink.Count;
        CheckRules(record, ordinal, width, height, settings, sink);
        CapPerRule(sink, start);
    }

    private static void CheckRules(LaneRecord record, long ordinal, int width, int height, AuditSettings settings, List<AuditFinding> sink)
    {
        IReadOnlyList<Lane> lanes = record.Lanes;
        double tol = settings.OrderTolerancePx;
        double? horizon = settings.HorizonRow ?? LaneSampling.EstimateHorizon(lanes, height);
        double roadTop = horizon ?? double.NegativeInfinity;
        AuditFinding F(string rule, int? lane, int? other, double value, double limit, string unit, string message) =>
            new(record.Frame, ordinal, rule, AuditRules.Get(rule).Severity, lane, other, value, limit, unit, message);

        // LBA-I01 lanes cross (below the horizon).
        for (int i = 0; i < lanes.Count; i++)
        {
            for (int j = i + 1; j < lanes.Count; j++)
            {
                (double lo, double hi) = LaneSampling.Common(lanes[i], lanes[j], roadTop);
                double pos = 0, neg = 0, atRow = double.NaN, previous = double.NaN;
                for (double y = Math.Floor(hi); y >= lo; y -= 2)
                {
                    if (LaneSampling.XAt(lanes[i], y, out double xi) && LaneSampling.XAt(lanes[j], y, out double xj))
                    {
                        double d = xi - xj;

                        // The crossing row: the first sampled row within the tolerance, else the first where the
                        // order flips between two sampled rows (steep lanes can jump past the tolerance band).
                        if (double.IsNaN(atRow) && previous * d < 0)
                        {
                            atRow = y;
                        }

                        previous = d;
                        if (d > pos)
                        {
                            pos = d;
                        }

                        if (-d > neg)
                        {
                            neg = -d;
                        }

                        if (Math.Abs(d) <= tol && double.IsNaN(atRow))
                        {
                            atRow = y;
                        }
                    }
                }

                double depth = Math.Min(pos, neg);
                if (depth > tol)
                {
                    sink.Add(F(AuditRules.LanesCross, i, j, depth, tol, "px", Inv($"lanes {i} and {j} cross near row {atRow:0} (each side by up to {depth:0.#} px)")));
                }
            }
        }

        // LBA-I02 fold-back (tolerance: the order tolerance, at least 1 % of the height for dense noisy labels).
        double foldTol = Math.Max(tol, 0.01 * height);
        for (int i = 0; i < lanes.Count; i++)
        {
            double minY = double.PositiveInfinity, worst = 0;
            foreach (LanePoint p in lanes[i].Points)
            {
                minY = Math.Min(minY, p.Y);
                worst = Math.Max(worst, p.Y - minY);
            }

            if (worst > foldTol)
            {
                sink.Add(F(AuditRules.FoldBack, i, null, worst, foldTol, "px", Inv($"lane {i} turns back down by {worst:0.#} px after rising (points must run near to far)")));
            }
        }

        // LBA-I03 above the horizon.
        if (horizon is double hz)
        {
            double margin = settings.HorizonMarginFraction * height;
            for (int i = 0; i < lanes.Count; i++)
            {
                double above = hz - LaneSampling.Extent(lanes[i]).Min;
                if (above > margin)
                {
                    string how = settings.HorizonRow is null ? "estimated vanishing row" : "horizon row";
                    sink.Add(F(AuditRules.AboveHorizon, i, null, above, margin, "px", Inv($"lane {i} reaches {above:0.#} px above the {how} {hz:0.#}")));
                }
            }
        }

        // LBA-I04 short lane (arc length: a lane at the image edge may span few rows yet be long).
        double minLength = Math.Max(20, settings.ShortLaneFraction * height);
        for (int i = 0; i < lanes.Count; i++)
        {
            double length = Geometry.Polylines.Length(lanes[i].Points);
            if (length < minLength)
            {
                sink.Add(F(AuditRules.ShortLane, i, null, length, minLength, "px", Inv($"lane {i} is {length:0.#} px long")));
            }
        }

        // LBA-I05 near duplicates. Only pairs whose x-extents come within dupPx of each other can have a median gap
        // under dupPx (every sampled x lies within its lane's point extent), so the pairs are swept in x order and
        // then checked in (i, j) order: the same findings in the same order as checking every pair.
        double dupPx = Math.Max(1, Math.Round(30.0 * width / 1640.0, MidpointRounding.ToEven));
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
                sink.Add(F(AuditRules.NearDuplicate, j, i, median, dupPx, "px", Inv($"lane {j} runs {median:0.#} px from lane {i} (median over common rows)")));
            }
        }

        // LBA-I06 slot order.
        for (int i = 0; i < lanes.Count; i++)
        {
            for (int j = i + 1; j < lanes.Count; j++)
            {
                if (lanes[i].Slot is not int si || lanes[j].Slot is not int sj)
                {
                    continue;
                }

                if (si == sj)
                {
                    sink.Add(F(AuditRules.SlotOrder, j, i, sj, 0, "slot", Inv($"lanes {i} and {j} both claim slot {sj}")));
                    continue;
                }

                (double lo, double hi) = LaneSampling.Common(lanes[i], lanes[j], roadTop);
                double row = Math.Floor(hi);
                if (row < lo || !LaneSampling.XAt(lanes[i], row, out double xi) || !LaneSampling.XAt(lanes[j], row, out double xj))
                {
                    continue;
                }

                (int left, int right, double xl, double xr) = si < sj ? (i, j, xi, xj) : (j, i, xj, xi);
                if (xl - xr > tol)
                {
                    sink.Add(F(AuditRules.SlotOrder, left, right, xl - xr, tol, "px", Inv($"lane {left} (slot {lanes[left].Slot}) lies {xl - xr:0.#} px right of lane {right} (slot {lanes[right].Slot}) at row {row:0}")));
                }
            }
        }

        // LBA-I07 neighbouring width ratio, at the nearest row with three lanes and the nearest row with all of them.
        CheckWidthRatio(record, ordinal, lanes, height, settings, sink);
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

    /// <summary>
    /// Keeps the first <see cref="InputLimits.MaxFindingsPerFrameAndRule"/> findings of each rule among
    /// <c>sink[start..]</c> (one frame) and replaces the rest by one finding that counts them.
    /// </summary>
    internal static void CapPerRule(List<AuditFinding> sink, int start)
    {
        const int Cap = InputLimits.MaxFindingsPerFrameAndRule;
        if (sink.Count - start <= Cap)
        {
            return;
        }

        var kept = new List<AuditFinding>(sink.Count - start);
        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int k = start; k < sink.Count; k++)
        {
            AuditFinding f = sink[k];
            int n = seen.GetValueOrDefault(f.Rule) + 1;
            seen[f.Rule] = n;
            if (n <= Cap)
            {
                kept.Add(f);
            }
        }

        var result = new List<AuditFinding>(kept.Count + seen.Count);
        for (int k = 0; k < kept.Count; k++)
        {
            AuditFinding f = kept[k];
            result.Add(f);
            bool lastOfRule = k + 1 == kept.Count || kept[k + 1].Rule != f.Rule;
            if (lastOfRule && seen[f.Rule] > Cap)
            {
                int rest = seen[f.Rule] - Cap;
                result.Add(f with
                {
                    Lane = null,
                    OtherLane = null,
                    Value = rest,
                    Limit = Cap,
                    Unit = "findings",
                    Message = Inv($"{rest} more findings of {f.Rule} in this frame (at most {Cap} per frame and rule are listed)"),
                });
            }
        }

        sink.RemoveRange(start, sink.Count - start);
        sink.AddRange(result);
    }

    private static void CheckWidthRatio(LaneRecord record, long ordinal, IReadOnlyList<Lane> lanes, int height, AuditSettings settings, List<AuditFinding> sink)
    {
        if (lanes.Count < 3)
        {
            return;
        }

        double? first = null, fullest = null;
        int most = 2;
        for (double y = height - 1; y >= 0; y -= 10)
        {
            int n = lanes.Count(l => LaneSampling.XAt(l, y, out _));
            if (n >= 3 && first is null)
            {
                first = y;
            }

            if (n > most)
            {
                most = n;
                fullest = y;
            }
        }

        var rows = new List<double>();
        if (first is double f)
        {
            rows.Add(f);
        }

        if (fullest is double g && g != first)
        {
            rows.Add(g);
        }

        var reported = new HashSet<int>();
        foreach (double row in rows)
        {
            var present = new List<(double X, int Lane)>();
            for (int i = 0; i < lanes.Count; i++)
            {
                if (LaneSampling.XAt(lanes[i], row, out double x))
                {
                    present.Add((x, i));
                }
            }

            present.Sort();
            for (int k = 1; k + 1 < present.Count; k++)
            {
                double w1 = present[k].X - present[k - 1].X, w2 = present[k + 1].X - present[k].X;
                if (Math.Min(w1, w2) < 10 || reported.Contains(present[k].Lane))
                {
                    continue; // too close to the vanishing point to measure, or a crossing/duplicate (other rules)
                }

                double ratio = Math.Max(w1, w2) / Math.Min(w1, w2);
                if (ratio > settings.MaxWidthRatio)
                {
                    reported.Add(present[k].Lane);
                    int lane = present[k].Lane;
                    sink.Add(new AuditFinding(
                        record.Frame, ordinal, AuditRules.WidthRatio, AuditRules.Get(AuditRules.WidthRatio).Severity, lane, null, ratio, settings.MaxWidthRatio, "ratio",
                        Inv($"the lanes either side of lane {lane} are {w1:0.#} px and {w2:0.#} px wide at row {row:0} (ratio {ratio:0.##})")));
                }
            }
        }
    }

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
