using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core;
using LaneBaseline.Core.Metrics.Coverage;

// IDISP004 misreads foreach over JsonElement.EnumerateObject()/EnumerateArray(): foreach disposes the enumerator.
#pragma warning disable IDISP004

namespace LaneBaseline.Reporting.Score;

/// <summary>
/// Reads the output of <c>score --json</c> (one system, or <c>systems</c> + <c>paired</c>) into a
/// <see cref="ScoreDocument"/>. Every problem throws <see cref="BadInputException"/> naming the file, the line (for
/// malformed JSON) or the key path, and the reason.
/// </summary>
public static class ScoreDocumentReader
{
    /// <summary>Reads and parses a score file.</summary>
    /// <param name="path">Path as the user gave it (used in messages).</param>
    public static ScoreDocument Read(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        if (Directory.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "is a directory, expected a score JSON file");
        }

        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "file not found");
        }

        byte[] bytes;
        try
        {
            bytes = File.ReadAllBytes(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }

        return Parse(bytes, path);
    }

    /// <summary>Parses score JSON held in memory.</summary>
    /// <param name="utf8">The document, UTF-8.</param>
    /// <param name="displayName">Name used in messages.</param>
    public static ScoreDocument Parse(ReadOnlyMemory<byte> utf8, string displayName)
    {
        JsonDocument doc;
        try
        {
            doc = JsonDocument.Parse(utf8);
        }
        catch (JsonException ex)
        {
            long line = (ex.LineNumber ?? 0) + 1;
            throw BadInputException.At(displayName, line, null, "malformed JSON (" + FirstSentence(ex.Message) + ")");
        }

        using (doc)
        {
            var ctx = new Context(displayName);
            JsonElement root = ctx.Object(doc.RootElement, "(root)");
            var settings = new List<KeyValuePair<string, string>>();
            if (root.TryGetProperty("settings", out JsonElement s))
            {
                Flatten(ctx.Object(s, "settings"), "settings", string.Empty, settings);
            }

            var systems = new List<SystemResult>();
            var paired = new List<PairedResult>();
            if (root.TryGetProperty("systems", out JsonElement sys))
            {
                foreach (JsonProperty p in ctx.Object(sys, "systems").EnumerateObject())
                {
                    systems.Add(ReadSystem(ctx, p.Value, "systems." + p.Name, p.Name));
                }

                if (systems.Count == 0)
                {
                    throw ctx.Error("systems", "holds no system");
                }

                if (root.TryGetProperty("paired", out JsonElement pairs))
                {
                    foreach (JsonProperty p in ctx.Object(pairs, "paired").EnumerateObject())
                    {
                        paired.Add(ReadPair(ctx, p.Value, "paired." + p.Name, p.Name));
                    }
                }
            }
            else
            {
                string name = settings.FirstOrDefault(kv => kv.Key.StartsWith("predictions.", StringComparison.Ordinal)).Key is string k
                    ? k["predictions.".Length..]
                    : "prediction";
                systems.Add(ReadSystem(ctx, root, "(root)", name));
            }

            return new ScoreDocument(systems, paired, settings);
        }
    }

    private static string FirstSentence(string message)
    {
        int cut = message.IndexOf(" Path:", StringComparison.Ordinal);
        return (cut > 0 ? message[..cut] : message).TrimEnd('.', ' ');
    }

    private static SystemResult ReadSystem(Context ctx, JsonElement e, string path, string name)
    {
        ctx.Object(e, path);
        Tally overall = ReadTally(ctx, e, path);
        IntervalSet? intervals = null;
        if (e.TryGetProperty("intervals", out JsonElement iv))
        {
            string ip = path + ".intervals";
            ctx.Object(iv, ip);
            var byStat = new SortedDictionary<string, Ci>(StringComparer.Ordinal);
            foreach (JsonProperty p in iv.EnumerateObject())
            {
                if (p.Value.ValueKind == JsonValueKind.Array)
                {
                    byStat[p.Name] = ReadCi(ctx, p.Value, ip + "." + p.Name);
                }
            }

            intervals = new IntervalSet(
                iv.TryGetProperty("method", out JsonElement m) && m.ValueKind == JsonValueKind.String ? m.GetString()! : "bootstrap",
                ctx.Float(iv, ip, "level"),
                ctx.Int(iv, ip, "resamples"),
                iv.TryGetProperty("seed", out JsonElement sd) && sd.TryGetUInt64(out ulong seed) ? seed : 0,
                byStat);
        }

        var sweep = new List<SweepPoint>();
        if (e.TryGetProperty("confidence_sweep", out JsonElement sw))
        {
            string sp = path + ".confidence_sweep";
            if (sw.ValueKind != JsonValueKind.Array)
            {
                throw ctx.Error(sp, "expected an array");
            }

            int i = 0;
            foreach (JsonElement pt in sw.EnumerateArray())
            {
                string pp = sp + "[" + i.ToString(CultureInfo.InvariantCulture) + "]";
                ctx.Object(pt, pp);
                sweep.Add(new SweepPoint(ctx.Float(pt, pp, "min_score"), ReadCounts(ctx, pt, pp)));
                i++;
            }
        }

        var byTag = new List<KeyValuePair<string, Tally>>();
        var tagIntervals = new Dictionary<string, IReadOnlyDictionary<string, Ci>>(StringComparer.Ordinal);
        if (e.TryGetProperty("by_tag", out JsonElement tags))
        {
            foreach (JsonProperty p in ctx.Object(tags, path + ".by_tag").EnumerateObject())
            {
                if (byTag.Count == InputLimits.MaxDistinctTags)
                {
                    throw ctx.Error(path + ".by_tag", $"more than {InputLimits.MaxDistinctTags} tags (the documented limit)");
                }

                byTag.Add(new(p.Name, ReadTally(ctx, ctx.Object(p.Value, path + ".by_tag." + p.Name), path + ".by_tag." + p.Name)));
                if (p.Value.TryGetProperty("intervals", out JsonElement tiv))
                {
                    string tp = path + ".by_tag." + p.Name + ".intervals";
                    var byStat = new Dictionary<string, Ci>(StringComparer.Ordinal);
                    foreach (JsonProperty q in ctx.Object(tiv, tp).EnumerateObject())
                    {
                        if (q.Value.ValueKind == JsonValueKind.Array)
                        {
                            byStat[q.Name] = ReadCi(ctx, q.Value, tp + "." + q.Name);
                        }
                    }

                    tagIntervals[p.Name] = byStat;
                }
            }
        }

        byTag.Sort((a, b) => string.CompareOrdinal(a.Key, b.Key));
        return new SystemResult(name, overall, intervals, sweep, byTag) { Calibration = ReadCalibration(ctx, e, path), Coverage = ReadCoverage(ctx, e, path), TagIntervals = tagIntervals };
    }

    private static FrameCoverage? ReadCoverage(Context ctx, JsonElement e, string path)
    {
        if (!e.TryGetProperty("coverage", out JsonElement c))
        {
            return null;
        }

        ctx.Object(c, path + ".coverage");
        try
        {
            return FrameCoverage.ReadJson(c);
        }
        catch (Exception ex) when (ex is KeyNotFoundException or InvalidOperationException or FormatException)
        {
            throw ctx.Error(path + ".coverage", "expected whole numbers truth_frames, pred_frames, missing, extra and string arrays first_missing, first_extra");
        }
    }

    private static CalibrationSummary? ReadCalibration(Context ctx, JsonElement e, string path)
    {
        if (!e.TryGetProperty("calibration", out JsonElement c))
        {
            return null;
        }

        string cp = path + ".calibration";
        ctx.Object(c, cp);
        var bins = new List<ReliabilityBin>();
        if (c.TryGetProperty("reliability", out JsonElement rel) && rel.ValueKind == JsonValueKind.Array)
        {
            int i = 0;
            foreach (JsonElement b in rel.EnumerateArray())
            {
                string bp = cp + ".reliability[" + i.ToString(CultureInfo.InvariantCulture) + "]";
                ctx.Object(b, bp);
                bins.Add(new ReliabilityBin(ctx.Float(b, bp, "low"), ctx.Float(b, bp, "high"), ctx.Int(b, bp, "lanes"), ctx.Float(b, bp, "mean_score"), ctx.Float(b, bp, "precision")));
                i++;
            }
        }

        double bestT = double.NaN, bestF1 = double.NaN;
        if (c.TryGetProperty("best_f1", out JsonElement best) && best.ValueKind == JsonValueKind.Object)
        {
            foreach (JsonProperty p in best.EnumerateObject())
            {
                if (p.Value.ValueKind == JsonValueKind.Number && p.Name is "threshold" or "min_score")
                {
                    bestT = p.Value.GetDouble();
                }
                else if (p.Value.ValueKind == JsonValueKind.Number && p.Name == "f1")
                {
                    bestF1 = p.Value.GetDouble();
                }
            }
        }

        return new CalibrationSummary(ctx.Int(c, cp, "scored_lanes"), ctx.Float(c, cp, "ece"), bins, bestT, bestF1);
    }

    private static Tally ReadTally(Context ctx, JsonElement e, string path)
    {
        JsonElement iou = ctx.Object(ctx.Required(e, path, "iou_f1"), path + ".iou_f1");
        string ip = path + ".iou_f1";
        JsonElement th = ctx.Object(ctx.Required(iou, ip, "thresholds"), ip + ".thresholds");
        var rows = new List<ThresholdRow>();
        foreach (JsonProperty p in th.EnumerateObject())
        {
            if (!double.TryParse(p.Name, NumberStyles.Float, CultureInfo.InvariantCulture, out double t) || !(t > 0 && t <= 1))
            {
                throw ctx.Error(ip + ".thresholds." + p.Name, "a threshold key must be a number in (0, 1]");
            }

            rows.Add(new ThresholdRow(p.Name, t, ReadCounts(ctx, ctx.Object(p.Value, ip + ".thresholds." + p.Name), ip + ".thresholds." + p.Name)));
        }

        if (rows.Count == 0)
        {
            throw ctx.Error(ip + ".thresholds", "holds no threshold");
        }

        rows.Sort((a, b) => a.Value.CompareTo(b.Value));
        int? width = iou.TryGetProperty("width_px", out JsonElement w) && w.ValueKind == JsonValueKind.Number ? w.GetInt32() : null;

        string pp = path + ".point_accuracy";
        JsonElement pa = ctx.Object(ctx.Required(e, path, "point_accuracy"), pp);
        double tol = ctx.Float(pa, pp, "tolerance_px");
        var point = new PointSummary(
            double.IsNaN(tol) ? null : tol,
            ctx.Float(pa, pp, "accuracy"),
            ctx.Float(pa, pp, "fp_rate"),
            ctx.Float(pa, pp, "fn_rate"),
            ctx.Int(pa, pp, "matched"));
        return new Tally(
            ctx.Int(e, path, "frames"),
            ctx.Int(e, path, "truth_lanes"),
            ctx.Int(e, path, "pred_lanes"),
            width,
            rows,
            ctx.Float(iou, ip, "mf1"),
            point)
        {
            Ground = ReadGround(ctx, e, path),
        };
    }

    private static GroundSummary? ReadGround(Context ctx, JsonElement e, string path)
    {
        if (!e.TryGetProperty("ground", out JsonElement g))
        {
            return null;
        }

        string gp = path + ".ground";
        ctx.Object(g, gp);
        var lateral = new List<GroundLateral>();
        string lp = gp + ".lateral_abs_error_m";
        foreach (JsonProperty p in ctx.Object(ctx.Required(g, gp, "lateral_abs_error_m"), lp).EnumerateObject())
        {
            if (!double.TryParse(p.Name, NumberStyles.Float, CultureInfo.InvariantCulture, out double d) || !double.IsFinite(d))
            {
                throw ctx.Error(lp + "." + p.Name, "a look-ahead key must be a distance in metres");
            }

            string dp = lp + "." + p.Name;
            ctx.Object(p.Value, dp);
            lateral.Add(new GroundLateral(p.Name, d, ctx.Int(p.Value, dp, "pairs"), ctx.Float(p.Value, dp, "mean")));
        }

        lateral.Sort((a, b) => a.DistanceM.CompareTo(b.DistanceM));
        string wp = gp + ".ego_width_abs_error_m", cp = gp + ".curvature_abs_error_per_m";
        JsonElement w = ctx.Object(ctx.Required(g, gp, "ego_width_abs_error_m"), wp);
        JsonElement c = ctx.Object(ctx.Required(g, gp, "curvature_abs_error_per_m"), cp);
        return new GroundSummary(lateral, ctx.Int(w, wp, "frames"), ctx.Float(w, wp, "mean"), ctx.Int(c, cp, "pairs"), ctx.Float(c, cp, "mean"));
    }

    private static DetectionSummary ReadCounts(Context ctx, JsonElement e, string path) => new(
        ctx.Int(e, path, "tp"),
        ctx.Int(e, path, "fp"),
        ctx.Int(e, path, "fn"),
        ctx.Float(e, path, "precision"),
        ctx.Float(e, path, "recall"),
        ctx.Float(e, path, "f1"));

    private static PairedResult ReadPair(Context ctx, JsonElement e, string path, string key)
    {
        ctx.Object(e, path);
        string a = ctx.String(e, path, "a"), b = ctx.String(e, path, "b");
        var byTag = new Dictionary<string, IReadOnlyList<PairedStatistic>>(StringComparer.Ordinal);
        if (e.TryGetProperty("by_tag", out JsonElement tags))
        {
            foreach (JsonProperty t in ctx.Object(tags, path + ".by_tag").EnumerateObject())
            {
                if (byTag.Count == InputLimits.MaxDistinctTags)
                {
                    throw ctx.Error(path + ".by_tag", $"more than {InputLimits.MaxDistinctTags} tags (the documented limit)");
                }

                byTag[t.Name] = ReadPairStatistics(ctx, ctx.Object(t.Value, path + ".by_tag." + t.Name), path + ".by_tag." + t.Name);
            }
        }

        return new PairedResult(key, a, b, ReadPairStatistics(ctx, e, path)) { ByTag = byTag };
    }

    private static List<PairedStatistic> ReadPairStatistics(Context ctx, JsonElement e, string path)
    {
        var stats = new List<PairedStatistic>();
        foreach (JsonProperty p in e.EnumerateObject())
        {
            if (p.Value.ValueKind != JsonValueKind.Object || p.Name == "by_tag")
            {
                continue;
            }

            string sp = path + "." + p.Name;
            Ci? ci = p.Value.TryGetProperty("ci95", out JsonElement c) ? ReadCi(ctx, c, sp + ".ci95") : null;
            stats.Add(new PairedStatistic(p.Name, ctx.Float(p.Value, sp, "diff"), ci));
        }

        return stats;
    }

    private static Ci ReadCi(Context ctx, JsonElement e, string path)
    {
        if (e.ValueKind != JsonValueKind.Array || e.GetArrayLength() != 2)
        {
            throw ctx.Error(path, "expected [low, high]");
        }

        return new Ci(ctx.Number(e[0], path + "[0]"), ctx.Number(e[1], path + "[1]"));
    }

    private static void Flatten(JsonElement e, string path, string prefix, List<KeyValuePair<string, string>> into)
    {
        foreach (JsonProperty p in e.EnumerateObject())
        {
            string key = prefix + p.Name;
            switch (p.Value.ValueKind)
            {
                case JsonValueKind.Object:
                    Flatten(p.Value, path + "." + p.Name, key + ".", into);
                    break;
                case JsonValueKind.Array:
                    into.Add(new(key, string.Join(", ", p.Value.EnumerateArray().Select(Text))));
                    break;
                default:
                    into.Add(new(key, Text(p.Value)));
                    break;
            }
        }
    }

    private static string Text(JsonElement e) => e.ValueKind switch
    {
        JsonValueKind.String => e.GetString()!,
        JsonValueKind.Null => "null",
        _ => e.GetRawText(),
    };

    /// <summary>Typed access with messages that name the file and key path.</summary>
    private sealed class Context(string file)
    {
        public BadInputException Error(string path, string problem) => BadInputException.At(file, 0, path, problem);

        public JsonElement Object(JsonElement e, string path) =>
            e.ValueKind == JsonValueKind.Object ? e : throw Error(path, "expected a JSON object, found " + Kind(e));

        public JsonElement Required(JsonElement e, string path, string name) =>
            e.TryGetProperty(name, out JsonElement v) ? v : throw Error(path + "." + name, "missing");

        public long Int(JsonElement e, string path, string name)
        {
            JsonElement v = Required(e, path, name);
            return v.ValueKind == JsonValueKind.Number && v.TryGetInt64(out long n) && n >= 0
                ? n
                : throw Error(path + "." + name, "expected a whole number of 0 or more, found " + Kind(v));
        }

        public double Float(JsonElement e, string path, string name) => Number(Required(e, path, name), path + "." + name);

        /// <summary>A float; JSON null (a non-finite value in the writer) reads as NaN.</summary>
        public double Number(JsonElement v, string path) => v.ValueKind switch
        {
            JsonValueKind.Number => v.GetDouble(),
            JsonValueKind.Null => double.NaN,
            _ => throw Error(path, "expected a number, found " + Kind(v)),
        };

        public string String(JsonElement e, string path, string name)
        {
            JsonElement v = Required(e, path, name);
            return v.ValueKind == JsonValueKind.String ? v.GetString()! : throw Error(path + "." + name, "expected a string, found " + Kind(v));
        }

        private static string Kind(JsonElement e) => e.ValueKind switch
        {
            JsonValueKind.Object => "an object",
            JsonValueKind.Array => "an array",
            JsonValueKind.String => "a string",
            JsonValueKind.Number => "the number " + e.GetRawText(),
            JsonValueKind.True or JsonValueKind.False => "a boolean",
            JsonValueKind.Null => "null",
            _ => "nothing",
        };
    }
}
