using System.Globalization;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// A quality gate on <c>score</c> results (<c>--gate EXPR</c>): <c>SYSTEM:METRIC&gt;=VALUE</c>,
/// <c>SYSTEM:TAG:METRIC&gt;=VALUE</c> or <c>diff(SYSTEM,BASE):METRIC&gt;=VALUE</c>, METRIC one of <c>f1@T</c>, <c>mf1</c>,
/// <c>precision@T</c>, <c>recall@T</c>, <c>accuracy</c>; the operator is one of <c>&gt;=</c>, <c>&gt;</c>, <c>&lt;=</c>,
/// <c>&lt;</c>. A paired gate compares the bound of the paired bootstrap interval of SYSTEM − BASE that the operator
/// makes conservative (the lower bound for <c>&gt;=</c> and <c>&gt;</c>, the upper bound otherwise).
/// </summary>
public sealed record ScoreGate
{
    /// <summary>The expression as given.</summary>
    public required string Text { get; init; }

    /// <summary>The system (for a paired gate, the one compared).</summary>
    public required string System { get; init; }

    /// <summary>The baseline of a paired gate, else null.</summary>
    public string? Base { get; init; }

    /// <summary>A tag of the truth, or null for all frames.</summary>
    public string? Tag { get; init; }

    /// <summary>The metric.</summary>
    public required GateMetric Metric { get; init; }

    /// <summary>The IoU threshold of f1/precision/recall (0.50 for the others, unused).</summary>
    public IouThreshold Threshold { get; init; } = IouThreshold.Half;

    /// <summary>The comparison operator: "&gt;=", "&gt;", "&lt;=" or "&lt;".</summary>
    public required string Operator { get; init; }

    /// <summary>The limit.</summary>
    public required double Limit { get; init; }

    /// <summary>Whether this is a paired (difference) gate.</summary>
    public bool IsPaired => Base is not null;

    /// <summary>Whether the gate needs an IoU threshold that the run must compute.</summary>
    public bool UsesThreshold => Metric is GateMetric.F1 or GateMetric.Precision or GateMetric.Recall;

    /// <summary>Parses one expression; a malformed one throws <see cref="FormatException"/> saying why.</summary>
    public static ScoreGate Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        string t = text.Trim();
        int op = t.IndexOfAny(['>', '<']);
        if (op <= 0)
        {
            throw new FormatException($"'{text}' has no comparison: write SYSTEM:METRIC>=VALUE, SYSTEM:TAG:METRIC>=VALUE or diff(SYSTEM,BASE):METRIC>=VALUE");
        }

        string oper = op + 1 < t.Length && t[op + 1] == '=' ? t.Substring(op, 2) : t.Substring(op, 1);
        string left = t[..op].Trim(), right = t[(op + oper.Length)..].Trim();
        if (!double.TryParse(right, NumberStyles.Float, CultureInfo.InvariantCulture, out double limit) || !double.IsFinite(limit))
        {
            throw new FormatException($"'{text}': '{right}' is not a number");
        }

        int colon = left.LastIndexOf(':');
        if (colon <= 0 || colon == left.Length - 1)
        {
            throw new FormatException($"'{text}': expected SYSTEM:METRIC before the comparison");
        }

        (GateMetric metric, IouThreshold threshold) = ParseMetric(text, left[(colon + 1)..].Trim());
        string subject = left[..colon].Trim();
        if (subject.StartsWith("diff(", StringComparison.Ordinal))
        {
            if (!subject.EndsWith(')'))
            {
                throw new FormatException($"'{text}': write diff(SYSTEM,BASE):METRIC");
            }

            string[] pair = subject[5..^1].Split(',', StringSplitOptions.TrimEntries);
            if (pair.Length != 2 || pair[0].Length == 0 || pair[1].Length == 0)
            {
                throw new FormatException($"'{text}': diff( ) takes two system names, diff(SYSTEM,BASE)");
            }

            if (metric == GateMetric.MeanF1 || (metric != GateMetric.Accuracy && threshold != IouThreshold.Half))
            {
                throw new FormatException($"'{text}': paired intervals exist for f1@0.50, precision@0.50, recall@0.50 and accuracy");
            }

            return new ScoreGate { Text = t, System = pair[0], Base = pair[1], Metric = metric, Threshold = threshold, Operator = oper, Limit = limit };
        }

        int first = subject.IndexOf(':', StringComparison.Ordinal);
        string system = first < 0 ? subject : subject[..first].Trim();
        string? tag = first < 0 ? null : subject[(first + 1)..].Trim();
        if (system.Length == 0 || tag is { Length: 0 })
        {
            throw new FormatException($"'{text}': empty system or tag name");
        }

        return new ScoreGate { Text = t, System = system, Tag = tag, Metric = metric, Threshold = threshold, Operator = oper, Limit = limit };
    }

    private static (GateMetric, IouThreshold) ParseMetric(string text, string m)
    {
        switch (m)
        {
            case "mf1":
                return (GateMetric.MeanF1, IouThreshold.Half);
            case "accuracy":
                return (GateMetric.Accuracy, IouThreshold.Half);
        }

        int at = m.IndexOf('@', StringComparison.Ordinal);
        GateMetric? metric = at < 0 ? null : m[..at] switch
        {
            "f1" => GateMetric.F1,
            "precision" => GateMetric.Precision,
            "recall" => GateMetric.Recall,
            _ => null,
        };
        if (metric is null)
        {
            throw new FormatException($"'{text}': unknown metric '{m}' (f1@T, mf1, precision@T, recall@T or accuracy)");
        }

        try
        {
            return (metric.Value, IouThreshold.Parse(m[(at + 1)..]));
        }
        catch (FormatException ex)
        {
            throw new FormatException($"'{text}': {ex.Message}", ex);
        }
    }

    /// <summary>The metric as written in the expression (<c>f1@0.50</c>, <c>mf1</c>, ...).</summary>
    public string MetricName => Metric switch
    {
        GateMetric.F1 => "f1@" + Threshold.Key,
        GateMetric.Precision => "precision@" + Threshold.Key,
        GateMetric.Recall => "recall@" + Threshold.Key,
        GateMetric.MeanF1 => "mf1",
        _ => "accuracy",
    };

    /// <summary>Evaluates the gate on finished results.</summary>
    /// <param name="results">Every system's scores.</param>
    /// <param name="bootstrap">The bootstrap (needed by paired gates), or null.</param>
    public GateOutcome Evaluate(IReadOnlyList<SystemScore> results, BootstrapResult? bootstrap)
    {
        ArgumentNullException.ThrowIfNull(results);
        int a = IndexOf(results, System);
        if (IsPaired)
        {
            int b = IndexOf(results, Base!);
            BootstrapStatistic stat = Metric switch
            {
                GateMetric.F1 => BootstrapStatistic.F1,
                GateMetric.Precision => BootstrapStatistic.Precision,
                GateMetric.Recall => BootstrapStatistic.Recall,
                _ => BootstrapStatistic.Accuracy,
            };
            double diff = ScoreJsonWriter.Statistic(results[a].Overall, stat) - ScoreJsonWriter.Statistic(results[b].Overall, stat);
            if (bootstrap is null || bootstrap.Resamples == 0)
            {
                return new GateOutcome(this, double.NaN, false, string.Create(CultureInfo.InvariantCulture, $"no bootstrap interval (--bootstrap 0); difference {diff:0.####}"));
            }

            Interval ci = ScoreJsonWriter.PairedInterval(bootstrap, a, b, stat);
            bool lower = Operator[0] == '>';
            double bound = lower ? ci.Low : ci.High;
            return new GateOutcome(this, bound, Compare(bound), string.Create(
                CultureInfo.InvariantCulture,
                $"{(lower ? "lower" : "upper")} bound of the 95 % paired interval {bound:0.####} (difference {diff:0.####}, interval [{ci.Low:0.####}, {ci.High:0.####}])"));
        }

        ScoreTally? tally = Tag is null ? results[a].Overall : results[a].ByTag.GetValueOrDefault(Tag);
        if (tally is null)
        {
            return new GateOutcome(this, double.NaN, false, $"no truth frame is tagged '{Tag}'");
        }

        double value = Metric switch
        {
            GateMetric.F1 => tally.IouF1.At(Threshold).F1,
            GateMetric.Precision => tally.IouF1.At(Threshold).Precision,
            GateMetric.Recall => tally.IouF1.At(Threshold).Recall,
            GateMetric.MeanF1 => tally.IouF1.MeanF1,
            _ => tally.Points.Accuracy,
        };
        return new GateOutcome(this, value, Compare(value), string.Create(CultureInfo.InvariantCulture, $"{MetricName} = {value:0.####}"));
    }

    private bool Compare(double value) => Operator switch
    {
        ">=" => value >= Limit,
        ">" => value > Limit,
        "<=" => value <= Limit,
        _ => value < Limit,
    };

    private static int IndexOf(IReadOnlyList<SystemScore> results, string name)
    {
        for (int i = 0; i < results.Count; i++)
        {
            if (results[i].System.Name == name)
            {
                return i;
            }
        }

        throw new ArgumentException($"no system named '{name}'", nameof(name));
    }
}
