using System.Globalization;
using System.Text.Encodings.Web;
using System.Text.Json;

using LaneBaseline.Core.Metrics.Ground;

namespace LaneBaseline.Core.Metrics;

/// <summary>Writes <c>score --json</c> output: stable keys of the score-json specification, plus documented extras.</summary>
public static class ScoreJsonWriter
{
    private static readonly JsonWriterOptions Options = new()
    {
        Indented = true,
        Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    /// <summary>Names of the bootstrap statistics as JSON keys.</summary>
    public static string StatisticKey(BootstrapStatistic s) => s switch
    {
        BootstrapStatistic.F1 => "f1@0.50",
        BootstrapStatistic.Precision => "precision@0.50",
        BootstrapStatistic.Recall => "recall@0.50",
        _ => "accuracy",
    };

    /// <summary>The <c>tool</c> value every JSON output of the command line carries.</summary>
    public const string Tool = "lanebaseline";

    /// <summary>The <c>schema_version</c> of this document (docs/schema/score.schema.json); bumped when a key changes meaning or goes.</summary>
    public const int SchemaVersion = 1;

    /// <summary>
    /// Writes the whole document to a stream; <paramref name="systemExtra"/> may add keys to each system's object
    /// (e.g. <c>mask_iou</c> when truth and predictions are mask folders).
    /// </summary>
    public static void Write(
        Stream stream,
        IReadOnlyList<SystemScore> systems,
        ScoreSettings settings,
        BootstrapResult? bootstrap,
        string truthPath,
        Action<Utf8JsonWriter, int>? systemExtra = null,
        Action<Utf8JsonWriter>? documentExtra = null)
    {
        ArgumentNullException.ThrowIfNull(systems);
        ArgumentNullException.ThrowIfNull(settings);
        using var json = new Utf8JsonWriter(stream, Options);
        json.WriteStartObject();
        json.WriteString("tool", Tool);
        json.WriteNumber("schema_version", SchemaVersion);
        if (systems.Count == 1)
        {
            // One system: its keys at the top level (docs/metrics.md) and, for one layout whatever the number of
            // systems, the same object again under systems.NAME.
            WriteSystemBody(json, systems[0], 0, settings, bootstrap);
            systemExtra?.Invoke(json, 0);
            json.WriteStartObject("systems");
            json.WriteStartObject(systems[0].System.Name);
            WriteSystemBody(json, systems[0], 0, settings, bootstrap);
            systemExtra?.Invoke(json, 0);
            json.WriteEndObject();
            json.WriteEndObject();
            WriteSettings(json, systems, settings, bootstrap, truthPath);
            documentExtra?.Invoke(json);
            json.WriteEndObject();
            return;
        }

        json.WriteStartObject("systems");
        for (int s = 0; s < systems.Count; s++)
        {
            json.WriteStartObject(systems[s].System.Name);
            WriteSystemBody(json, systems[s], s, settings, bootstrap);
            systemExtra?.Invoke(json, s);
            json.WriteEndObject();
        }

        json.WriteEndObject();
        json.WriteStartObject("paired");
        for (int a = 0; a < systems.Count; a++)
        {
            for (int b = a + 1; b < systems.Count; b++)
            {
                json.WriteStartObject(PairKey(systems[a], systems[b]));
                json.WriteString("a", systems[a].System.Name);
                json.WriteString("b", systems[b].System.Name);
                foreach (BootstrapStatistic stat in Enum.GetValues<BootstrapStatistic>())
                {
                    json.WriteStartObject(StatisticKey(stat));
                    json.WritePropertyName("diff");
                    WriteFloat(json, Statistic(systems[a].Overall, stat) - Statistic(systems[b].Overall, stat));
                    if (bootstrap is not null && bootstrap.Resamples > 0)
                    {
                        Interval ci = PairedInterval(bootstrap, a, b, stat);
                        json.WritePropertyName("ci95");
                        WriteInterval(json, ci);
                    }

                    json.WriteEndObject();
                }

                if (bootstrap is { Resamples: > 0 } && bootstrap.ByTag.Count > 0)
                {
                    json.WriteStartObject("by_tag");
                    foreach (KeyValuePair<string, TagBootstrap> kv in bootstrap.ByTag)
                    {
                        json.WriteStartObject(kv.Key);
                        for (int stat = 0; stat < Bootstrap.StatisticsWithMeanF1; stat++)
                        {
                            json.WriteStartObject(TagBootstrap.Key(stat));
                            json.WritePropertyName("diff");
                            WriteFloat(json, TagBootstrap.Value(systems[a].ByTag[kv.Key], stat) - TagBootstrap.Value(systems[b].ByTag[kv.Key], stat));
                            json.WritePropertyName("ci95");
                            WriteInterval(json, kv.Value.Paired(a, b, stat, bootstrap.Level));
                            json.WriteEndObject();
                        }

                        json.WriteEndObject();
                    }

                    json.WriteEndObject();
                }

                json.WriteEndObject();
            }
        }

        json.WriteEndObject();
        WriteSettings(json, systems, settings, bootstrap, truthPath);
        documentExtra?.Invoke(json);
        json.WriteEndObject();
    }

    /// <summary>The key of a paired comparison: "A - B".</summary>
    public static string PairKey(SystemScore a, SystemScore b)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        return a.System.Name + " - " + b.System.Name;
    }

    /// <summary>The interval of statistic(a) − statistic(b) over the joint resamples.</summary>
    public static Interval PairedInterval(BootstrapResult bootstrap, int a, int b, BootstrapStatistic stat)
    {
        ArgumentNullException.ThrowIfNull(bootstrap);
        double[] sa = bootstrap.Samples[a][(int)stat], sb = bootstrap.Samples[b][(int)stat];
        var diff = new double[sa.Length];
        for (int i = 0; i < diff.Length; i++)
        {
            diff[i] = sa[i] - sb[i];
        }

        return Bootstrap.Percentiles(diff, bootstrap.Level);
    }

    /// <summary>The full-sample value of a bootstrap statistic.</summary>
    public static double Statistic(ScoreTally tally, BootstrapStatistic stat)
    {
        ArgumentNullException.ThrowIfNull(tally);
        DetectionCounts c = tally.IouF1.At(IouThreshold.Half);
        return stat switch
        {
            BootstrapStatistic.F1 => c.F1,
            BootstrapStatistic.Precision => c.Precision,
            BootstrapStatistic.Recall => c.Recall,
            _ => tally.Points.Accuracy,
        };
    }

    /// <summary>Formats a metric as a JSON float at full (round-trip) precision, always with a decimal point.</summary>
    public static string FormatFloat(double value)
    {
        string s = value.ToString("R", CultureInfo.InvariantCulture);
        return s.Contains('.', StringComparison.Ordinal) || s.Contains('E', StringComparison.Ordinal) ? s : s + ".0";
    }

    /// <summary>Writes a metric at full precision (<see cref="FormatFloat"/>), or null when it is not finite.</summary>
    internal static void WriteFloat(Utf8JsonWriter json, double value)
    {
        if (double.IsFinite(value))
        {
            json.WriteRawValue(FormatFloat(value), skipInputValidation: true);
        }
        else
        {
            json.WriteNullValue();
        }
    }

    private static void WriteInterval(Utf8JsonWriter json, Interval ci)
    {
        json.WriteStartArray();
        WriteFloat(json, ci.Low);
        WriteFloat(json, ci.High);
        json.WriteEndArray();
    }

    private static void WriteSystemBody(Utf8JsonWriter json, SystemScore system, int index, ScoreSettings settings, BootstrapResult? bootstrap)
    {
        WriteTally(json, system.Overall, system, settings, includeFrames: true);

        if (bootstrap is not null && bootstrap.Resamples > 0)
        {
            json.WriteStartObject("intervals");
            json.WriteString("method", bootstrap.Unit == BootstrapUnit.Sequence ? "percentile bootstrap over sequences (cluster bootstrap)" : "percentile bootstrap over frames");
            json.WritePropertyName("level");
            WriteFloat(json, bootstrap.Level);
            json.WriteNumber("resamples", bootstrap.Resamples);
            json.WriteNumber("seed", bootstrap.Seed);
            json.WriteString("unit", bootstrap.UnitName);
            json.WriteNumber("units", bootstrap.Units);
            json.WriteNumber("clusters", bootstrap.Clusters);
            foreach (BootstrapStatistic stat in Enum.GetValues<BootstrapStatistic>())
            {
                json.WritePropertyName(StatisticKey(stat));
                WriteInterval(json, bootstrap.Intervals[index][(int)stat]);
            }

            json.WriteEndObject();
        }

        WriteUnits(json, MetricJsonSlot.Closing, system.Overall, system, settings);
        json.WriteStartObject("by_tag");
        foreach (KeyValuePair<string, ScoreTally> kv in system.ByTag)
        {
            json.WriteStartObject(kv.Key);
            WriteTally(json, kv.Value, null, settings, includeFrames: true);
            WriteUnits(json, MetricJsonSlot.Closing, kv.Value, null, settings);
            if (bootstrap is { Resamples: > 0 } && bootstrap.ByTag.TryGetValue(kv.Key, out TagBootstrap? tb))
            {
                json.WriteStartObject("intervals");
                json.WriteString("unit", bootstrap.UnitName);
                json.WriteNumber("units", tb.Units);
                for (int stat = 0; stat < Bootstrap.StatisticsWithMeanF1; stat++)
                {
                    json.WritePropertyName(TagBootstrap.Key(stat));
                    WriteInterval(json, tb.Intervals[index][stat]);
                }

                json.WriteEndObject();
            }

            json.WriteEndObject();
        }

        json.WriteEndObject();
    }

    // The parts of the metric units in one slot, in catalogue order.
    private static void WriteUnits(Utf8JsonWriter json, MetricJsonSlot slot, ScoreTally tally, SystemScore? system, ScoreSettings settings)
    {
        foreach (IMetricUnit unit in MetricCatalogue.InSlot(slot))
        {
            unit.WriteJson(json, tally, system, settings);
        }
    }

    private static void WriteTally(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings, bool includeFrames)
    {
        if (includeFrames)
        {
            json.WriteNumber("frames", tally.Frames);
        }

        json.WriteNumber("truth_lanes", tally.TruthLanes);
        json.WriteNumber("pred_lanes", tally.PredLanes);
        WriteUnits(json, MetricJsonSlot.Tally, tally, system, settings);
    }

    private static void WriteSettings(Utf8JsonWriter json, IReadOnlyList<SystemScore> systems, ScoreSettings settings, BootstrapResult? bootstrap, string truthPath)
    {
        json.WriteStartObject("settings");
        json.WriteString("truth", truthPath);
        json.WriteStartObject("predictions");
        foreach (SystemScore s in systems)
        {
            json.WriteString(s.System.Name, s.System.Path);
        }

        json.WriteEndObject();
        if (settings.LaneWidthPx is int lw)
        {
            json.WriteNumber("lane_width_px", lw);
        }
        else
        {
            json.WriteNull("lane_width_px");
        }

        json.WritePropertyName("tolerance_px");
        if (settings.TolerancePx is double t)
        {
            WriteFloat(json, t);
        }
        else
        {
            json.WriteNullValue();
        }

        json.WriteStartArray("iou_thresholds");
        foreach (IouThreshold th in settings.Thresholds)
        {
            json.WriteStringValue(th.Key);
        }

        json.WriteEndArray();
        if (settings.Camera is not null)
        {
            json.WriteStartArray("lookahead_m");
            foreach (double d in GroundErrors.DefaultLookAheadM)
            {
                WriteFloat(json, d);
            }

            json.WriteEndArray();
        }

        json.WriteNumber("bootstrap_resamples", bootstrap?.Resamples ?? 0);
        json.WriteNumber("seed", bootstrap?.Seed ?? 0);
        if (bootstrap is not null && bootstrap.Resamples > 0)
        {
            json.WriteString("bootstrap_unit", bootstrap.UnitName);
            json.WriteNumber("bootstrap_clusters", bootstrap.Clusters);
        }
        json.WriteEndObject();
    }
}
