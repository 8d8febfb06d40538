using ScottPlot;

// IDISP004: plottables returned by plot.Add.* are owned and disposed by the Plot, which each chart disposes.
#pragma warning disable IDISP004

namespace LaneBaseline.Reporting;

/// <summary>Charts of bench runs and audit findings: stage times and findings per rule.</summary>
internal static partial class Charts
{
    /// <summary>Grouped bars: median milliseconds per pipeline stage, one colour per bench configuration.</summary>
    public static string StageBars(IReadOnlyList<Bench.BenchRun> runs, string idPrefix)
    {
        ArgumentNullException.ThrowIfNull(runs);
        using var plot = NewPlot();
        // Pipeline order: the run with the most stages first (a run on enlarged frames has the resize stage in front).
        string[] stages = [.. runs.OrderByDescending(r => r.Stages.Count).SelectMany(r => r.Stages.Select(s => s.Stage)).Distinct()];
        double width = 0.8 / Math.Max(1, runs.Count);
        var bars = new List<Bar>();
        for (int k = 0; k < runs.Count; k++)
        {
            for (int i = 0; i < stages.Length; i++)
            {
                double v = runs[k].Stages.Where(s => s.Stage == stages[i]).Select(s => s.MedianMs).DefaultIfEmpty(0).First();
                bars.Add(new Bar { Position = i - 0.4 + (width * (k + 0.5)), Value = v, Size = width * 0.9, FillColor = Color.FromHex(SystemColor(k)), LineWidth = 0 });
            }

            plot.Legend.ManualItems.Add(new LegendItem { LabelText = runs[k].Label, FillColor = Color.FromHex(SystemColor(k)) });
        }

        plot.Add.Bars(bars);
        CategoryTicks(plot, [.. Enumerable.Range(0, stages.Length).Select(i => (double)i)], stages);
        plot.ShowLegend(Alignment.UpperRight);
        plot.YLabel("Median ms");
        double max = bars.Select(b => b.Value).DefaultIfEmpty(0).Max();
        plot.Axes.SetLimits(-0.6, stages.Length - 0.4, 0, Math.Max(0.1, max * 1.2));
        return ToSvg(plot, 900, 380, idPrefix, "Median milliseconds per stage");
    }

    /// <summary>Findings per audit rule, one bar per rule coloured by severity.</summary>
    public static string AuditRuleBars(IReadOnlyList<Audit.AuditRuleCount> rules, string idPrefix)
    {
        using var plot = NewPlot();
        var bars = new List<Bar>();
        for (int i = 0; i < rules.Count; i++)
        {
            bars.Add(new Bar { Position = i, Value = rules[i].Findings, FillColor = Color.FromHex(SeverityColor(rules[i].Severity)), LineWidth = 0 });
        }

        plot.Add.Bars(bars);
        bool crowded = CategoryTicks(plot, [.. Enumerable.Range(0, rules.Count).Select(i => (double)i)], [.. rules.Select(r => r.Id)]);
        foreach (string severity in SeverityNames.Where(s => rules.Any(r => r.Severity == s)))
        {
            plot.Legend.ManualItems.Add(new LegendItem { LabelText = severity, FillColor = Color.FromHex(SeverityColor(severity)) });
        }

        plot.ShowLegend(Alignment.UpperRight);
        plot.YLabel("Findings");
        plot.Axes.Left.TickGenerator = new ScottPlot.TickGenerators.NumericAutomatic { IntegerTicksOnly = true }; // counts
        double max = rules.Select(r => (double)r.Findings).DefaultIfEmpty(0).Max();
        plot.Axes.SetLimits(-0.8, Math.Max(1, rules.Count - 0.2), 0, Math.Max(1, max * 1.15));
        return ToSvg(plot, 900, crowded ? 440 : 380, idPrefix, "Audit findings per rule");
    }

    /// <summary>Our severity colours (error red-brown, warning amber, info grey-blue).</summary>
    public static string SeverityColor(string severity) => severity switch
    {
        "error" => Palette.Error,
        "warning" => Palette.Warning,
        _ => Palette.Info,
    };
}
