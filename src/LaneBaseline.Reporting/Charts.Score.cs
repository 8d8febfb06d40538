using System.Globalization;
using LaneBaseline.Reporting.Score;
using ScottPlot;

// IDISP004: plottables returned by plot.Add.* are owned and disposed by the Plot, which each chart disposes.
#pragma warning disable IDISP004

namespace LaneBaseline.Reporting;

/// <summary>Charts of score results: F1 against IoU, ground lateral error, precision-recall, reliability, tags, severity curves and paired differences.</summary>
internal static partial class Charts
{
    /// <summary>F1 against the IoU threshold, one curve per system.</summary>
    public static string F1VersusIou(IReadOnlyList<SystemResult> systems, string idPrefix)
    {
        using var plot = NewPlot();
        for (int s = 0; s < systems.Count; s++)
        {
            ThresholdRow[] rows = [.. systems[s].Overall.Thresholds.Where(r => double.IsFinite(r.Counts.F1))];
            if (rows.Length == 0)
            {
                continue;
            }

            var line = plot.Add.Scatter(rows.Select(r => r.Value).ToArray(), rows.Select(r => r.Counts.F1).ToArray());
            line.LegendText = systems[s].Name;
            line.Color = Color.FromHex(SystemColor(s));
            line.LineWidth = 2;
            line.MarkerSize = 6;
        }

        plot.XLabel("IoU threshold");
        plot.YLabel("F1");
        plot.Axes.SetLimits(0, 1, 0, 1.0); // F1 ends at 1.0
        plot.ShowLegend(Alignment.LowerLeft);
        return ToSvg(plot, 900, 420, idPrefix, "F1 against IoU threshold");
    }

    /// <summary>Mean absolute lateral error on the road plane (metres) against the distance ahead, one curve per system with a camera.</summary>
    public static string GroundLateral(IReadOnlyList<SystemResult> systems, string idPrefix)
    {
        using var plot = NewPlot();
        double top = 0, far = 0;
        for (int s = 0; s < systems.Count; s++)
        {
            if (systems[s].Overall.Ground is not { } g)
            {
                continue;
            }

            GroundLateral[] pts = [.. g.Lateral.Where(l => double.IsFinite(l.MeanM) && l.Pairs > 0)];
            far = Math.Max(far, g.Lateral.Count == 0 ? 0 : g.Lateral.Max(l => l.DistanceM));
            if (pts.Length == 0)
            {
                continue;
            }

            var line = plot.Add.Scatter(pts.Select(p => p.DistanceM).ToArray(), pts.Select(p => p.MeanM).ToArray());
            line.LegendText = systems[s].Name;
            line.Color = Color.FromHex(SystemColor(s));
            line.LineWidth = 2;
            line.MarkerSize = 7;
            top = Math.Max(top, pts.Max(p => p.MeanM));
        }

        plot.XLabel("Distance ahead (m)");
        plot.YLabel("Mean |lateral error| (m)");
        // one tick per look-ahead distance measured (5, 10, 20, 30 m), not one per metre
        double[] distances = [.. systems.Where(x => x.Overall.Ground is not null).SelectMany(x => x.Overall.Ground!.Lateral).Select(l => l.DistanceM).Distinct().Order()];
        var ticks = new ScottPlot.TickGenerators.NumericManual();
        foreach (double d in distances.Prepend(0))
        {
            ticks.AddMajor(d, d.ToString("0.##", CultureInfo.InvariantCulture));
        }

        plot.Axes.Bottom.TickGenerator = ticks;
        // metres start at 0 (an error has no sign here); a tenth of headroom above the largest mean
        plot.Axes.SetLimits(0, Math.Max(1, far) * 1.05, 0, top > 0 ? top * 1.1 : 1);
        plot.ShowLegend(Alignment.UpperLeft);
        return ToSvg(plot, 900, 360, idPrefix, "Lateral error on the road plane against distance ahead");
    }

    /// <summary>Precision against recall as the minimum lane confidence rises (IoU 0.50).</summary>
    public static string PrecisionRecall(IReadOnlyList<SystemResult> systems, string idPrefix)
    {
        using var plot = NewPlot();
        for (int s = 0; s < systems.Count; s++)
        {
            SweepPoint[] pts = [.. systems[s].ConfidenceSweep.Where(p => double.IsFinite(p.Counts.Precision) && double.IsFinite(p.Counts.Recall))];
            if (pts.Length == 0)
            {
                continue;
            }

            var line = plot.Add.Scatter(pts.Select(p => p.Counts.Recall).ToArray(), pts.Select(p => p.Counts.Precision).ToArray());
            line.LegendText = systems[s].Name;
            line.Color = Color.FromHex(SystemColor(s));
            line.LineWidth = 2;
            line.MarkerSize = 6;
        }

        plot.XLabel("Recall at IoU 0.50");
        plot.YLabel("Precision at IoU 0.50");
        // zoomed to the data: the sweep's points with a margin of a tenth of their span (at least 0.02), inside [0, 1]
        double[] rs = [.. systems.SelectMany(x => x.ConfidenceSweep).Select(p => p.Counts.Recall).Where(double.IsFinite)];
        double[] ps = [.. systems.SelectMany(x => x.ConfidenceSweep).Select(p => p.Counts.Precision).Where(double.IsFinite)];
        (double x0, double x1) = ZoomRange(rs);
        (double y0, double y1) = ZoomRange(ps);
        plot.Axes.SetLimits(x0, x1, y0, y1);
        plot.ShowLegend(Alignment.LowerLeft);
        return ToSvg(plot, 900, 420, idPrefix, "Precision against recall over lane confidence");
    }

    /// <summary>An axis range around values in [0, 1]: their span plus a tenth of it each side (at least 0.02), clipped to [0, 1]; [0, 1] without values.</summary>
    public static (double Low, double High) ZoomRange(IReadOnlyCollection<double> values)
    {
        ArgumentNullException.ThrowIfNull(values);
        if (values.Count == 0)
        {
            return (0, 1);
        }

        double lo = values.Min(), hi = values.Max(), pad = Math.Max(0.02, (hi - lo) / 10);
        return (Math.Max(0, lo - pad), Math.Min(1, hi + pad));
    }

    /// <summary>
    /// Reliability diagram: per score bin with lanes, the share of true positives at IoU 0.50 against the bin's mean
    /// score, one curve per system, and the diagonal of perfect calibration.
    /// </summary>
    public static string Reliability(IReadOnlyList<SystemResult> systems, string idPrefix)
    {
        using var plot = NewPlot();
        var diagonal = plot.Add.Line(0, 0, 1, 1);
        diagonal.Color = Color.FromHex(Palette.Grey);
        diagonal.LinePattern = LinePattern.Dashed;
        diagonal.LegendText = "perfect calibration";
        for (int s = 0; s < systems.Count; s++)
        {
            if (systems[s].Calibration is not { } cal)
            {
                continue;
            }

            ReliabilityBin[] bins = [.. cal.Bins.Where(b => b.Lanes > 0 && double.IsFinite(b.MeanScore) && double.IsFinite(b.Precision))];
            if (bins.Length == 0)
            {
                continue;
            }

            var line = plot.Add.Scatter(bins.Select(b => b.MeanScore).ToArray(), bins.Select(b => b.Precision).ToArray());
            line.LegendText = systems[s].Name + string.Create(CultureInfo.InvariantCulture, $" (ECE {cal.Ece:0.000})");
            line.Color = Color.FromHex(SystemColor(s));
            line.LineWidth = 2;
            line.MarkerSize = 7;
        }

        plot.XLabel("Mean lane score in the bin");
        plot.YLabel("Precision at IoU 0.50");
        plot.Axes.SetLimits(0, 1, 0, 1.0);
        plot.ShowLegend(Alignment.UpperLeft);
        return ToSvg(plot, 900, 420, idPrefix, "Reliability of lane scores");
    }

    /// <summary>F1 at IoU 0.50 per tag, grouped bars with one bar per system.</summary>
    public static string TagBars(IReadOnlyList<SystemResult> systems, IReadOnlyList<string> tags, string idPrefix)
    {
        using var plot = NewPlot();
        int n = systems.Count;
        var bars = new List<Bar>();
        for (int t = 0; t < tags.Count; t++)
        {
            for (int s = 0; s < n; s++)
            {
                Tally? tally = systems[s].ByTag.FirstOrDefault(kv => kv.Key == tags[t]).Value;
                double f1 = tally?.At("0.50")?.F1 ?? double.NaN;
                if (!double.IsFinite(f1))
                {
                    continue;
                }

                bars.Add(new Bar
                {
                    Position = (t * (n + 1)) + s,
                    Value = f1,
                    FillColor = Color.FromHex(SystemColor(s)),
                    LineWidth = 0,
                });
            }
        }

        plot.Add.Bars(bars);
        bool crowded = CategoryTicks(plot, [.. Enumerable.Range(0, tags.Count).Select(t => (t * (n + 1)) + ((n - 1) / 2.0))], tags);
        AddSystemLegend(plot, systems);
        plot.ShowLegend(Edge.Right); // beside the plot: inside it the legend covered the last tags' bars at F1 1.0
        plot.YLabel("F1 at IoU 0.50");
        plot.Axes.SetLimits(-0.8, (tags.Count * (n + 1)) - 1.2, 0, 1.0); // F1 ends at 1.0
        return ToSvg(plot, 900, crowded ? 480 : 400, idPrefix, "F1 at IoU 0.50 per tag");
    }

    /// <summary>Severity values of <c>severity=X</c> tags (as written by <c>render --sweep</c>), ascending, with their tag keys.</summary>
    public static IReadOnlyList<(double Severity, string Tag)> SeverityTags(IEnumerable<string> tags) =>
        [.. tags.Where(t => t.StartsWith(SeverityPrefix, StringComparison.Ordinal))
            .Select(t => (Ok: double.TryParse(t.AsSpan(SeverityPrefix.Length), NumberStyles.Float, CultureInfo.InvariantCulture, out double v) && double.IsFinite(v), Value: v, Tag: t))
            .Where(x => x.Ok)
            .OrderBy(x => x.Value)
            .Select(x => (x.Value, x.Tag))];

    /// <summary>F1 at IoU 0.50 against sweep severity, one curve per system.</summary>
    public static string SeverityCurves(IReadOnlyList<SystemResult> systems, IReadOnlyList<(double Severity, string Tag)> levels, string idPrefix)
    {
        using var plot = NewPlot();
        for (int s = 0; s < systems.Count; s++)
        {
            var xs = new List<double>();
            var ys = new List<double>();
            foreach ((double sev, string tag) in levels)
            {
                double f1 = systems[s].ByTag.FirstOrDefault(kv => kv.Key == tag).Value?.At("0.50")?.F1 ?? double.NaN;
                if (double.IsFinite(f1))
                {
                    xs.Add(sev);
                    ys.Add(f1);
                }
            }

            if (xs.Count == 0)
            {
                continue;
            }

            var line = plot.Add.Scatter(xs.ToArray(), ys.ToArray());
            line.LegendText = systems[s].Name;
            line.Color = Color.FromHex(SystemColor(s));
            line.LineWidth = 2;
            line.MarkerSize = 7;
        }

        plot.XLabel("Condition severity (render --sweep)");
        var ticks = new ScottPlot.TickGenerators.NumericManual(); // one tick per rendered level, not one per 0.05
        foreach ((double sev, _) in levels)
        {
            ticks.AddMajor(sev, sev.ToString("0.##", CultureInfo.InvariantCulture));
        }

        plot.Axes.Bottom.TickGenerator = ticks;
        plot.YLabel("F1 at IoU 0.50");
        double lo = Math.Min(0, levels.Min(l => l.Severity)), hi = Math.Max(1, levels.Max(l => l.Severity));
        plot.Axes.SetLimits(lo - 0.03, hi + 0.03, 0, 1.0); // F1 ends at 1.0
        plot.ShowLegend(Alignment.LowerLeft);
        return ToSvg(plot, 900, 380, idPrefix, "F1 at IoU 0.50 against condition severity");
    }

    /// <summary>Paired differences A − B with their 95 % intervals (bar = interval, dot = full-sample difference).</summary>
    public static string PairedDifferences(IReadOnlyList<PairedResult> pairs, string idPrefix)
    {
        using var plot = NewPlot();
        var positions = new List<double>();
        var labels = new List<string>();
        var bars = new List<Bar>();
        var xs = new List<double>();
        var ys = new List<double>();
        int x = 0;
        for (int p = 0; p < pairs.Count; p++)
        {
            foreach (PairedStatistic st in pairs[p].Statistics)
            {
                if (st.Ci95 is Ci ci && double.IsFinite(ci.Low) && double.IsFinite(ci.High))
                {
                    bars.Add(new Bar
                    {
                        Position = x,
                        ValueBase = ci.Low,
                        Value = ci.High,
                        Size = 0.45,
                        FillColor = Color.FromHex(SystemColor(p)).WithAlpha(0.35),
                        LineWidth = 0,
                    });
                }

                if (double.IsFinite(st.Diff))
                {
                    xs.Add(x);
                    ys.Add(st.Diff);
                }

                positions.Add(x);
                labels.Add(st.Key + (pairs.Count > 1 ? "\n" + pairs[p].Key : string.Empty));
                x++;
            }

            x++;
        }

        if (bars.Count > 0)
        {
            plot.Add.Bars(bars);
        }

        var zero = plot.Add.HorizontalLine(0);
        zero.LineColor = Color.FromHex(Palette.ZeroLine);
        zero.LineWidth = 1;
        if (xs.Count > 0)
        {
            var dots = plot.Add.Markers(xs.ToArray(), ys.ToArray());
            dots.MarkerSize = 9;
            dots.Color = Color.FromHex(Palette.Dots);
        }

        plot.Axes.Bottom.SetTicks([.. positions], [.. labels]);
        plot.YLabel(pairs.Count == 1 ? "Difference " + pairs[0].Key : "Difference A − B");
        double lo = Math.Min(0, bars.Select(b => b.ValueBase).Concat(ys).DefaultIfEmpty(0).Min());
        double hi = Math.Max(0, bars.Select(b => b.Value).Concat(ys).DefaultIfEmpty(0).Max());
        double pad = Math.Max(0.05, (hi - lo) * 0.1);
        plot.Axes.SetLimits(-0.8, Math.Max(1, x - 1.2), lo - pad, hi + pad);
        return ToSvg(plot, 900, 380, idPrefix, "Paired differences with 95 % intervals");
    }

    private static void AddSystemLegend(Plot plot, IReadOnlyList<SystemResult> systems)
    {
        for (int s = 0; s < systems.Count; s++)
        {
            plot.Legend.ManualItems.Add(new LegendItem { LabelText = systems[s].Name, FillColor = Color.FromHex(SystemColor(s)) });
        }

        plot.ShowLegend(Alignment.UpperRight);
    }
}
