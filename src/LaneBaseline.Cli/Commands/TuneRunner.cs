using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Core.Tuning;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Cli.Commands;

/// <summary>
/// Runs tune: splits the labelled frames into tuning and holdout frames by a stable hash of the frame key, decodes
/// the frames once and keeps them in memory (up to <see cref="MemoryCapBytes"/> of pixels; larger sets are decoded
/// again for every trial), lets <see cref="Tuner"/> propose parameter sets, evaluates each on the tuning frames with
/// the detect pipeline and the project's scorer, logs every trial (JSON lines, flushed per trial) and finally writes
/// the best preset with a header comparing base and tuned presets on tuning and holdout frames.
/// </summary>
/// <remarks>
/// A trial whose values make an invalid preset (a value outside a key's valid range, or a combination the preset
/// checks reject) or on which the pipeline fails is scored <see cref="WorstScore"/> and logged with the reason;
/// the search goes on.
/// </remarks>
internal sealed class TuneRunner
{
    /// <summary>Score of an invalid trial: below every objective's range [0, 1].</summary>
    public const double WorstScore = -1;

    /// <summary>Decoded pixels kept in memory across trials; above this frames are decoded again per trial.</summary>
    public const long MemoryCapBytes = 1L << 30;

    private const string DefaultSpaceName = "configs/tune-space.yaml";
    private const double ImageFps = 10;
    private readonly TuneRequest request;
    private readonly TextWriter stderr;
    private readonly ConcurrentDictionary<string, TrialNote> notes = new(StringComparer.Ordinal);

    /// <summary>Owner of every frame kept in memory (key to frame), disposed when the run ends.</summary>
    private readonly Dictionary<string, Mat> decoded = new(StringComparer.Ordinal);
    private SearchSpace space = null!;
    private string baseYaml = string.Empty;

    public TuneRunner(TuneRequest request, TextWriter stderr)
    {
        this.request = request;
        this.stderr = stderr;
    }

    /// <summary>Path of the trial log written beside the output preset.</summary>
    public static string LogPathFor(string output) => output + ".trials.jsonl";

    public TuneSummary Run()
    {
        string? outDir = Path.GetDirectoryName(Path.GetFullPath(request.Output));
        if (outDir is not null && !Directory.Exists(outDir))
        {
            throw new UsageException(request.Output + ": the output folder does not exist");
        }

        PipelineOptions baseOptions = KnownPresets.Resolve(request.ConfigSource);
        baseYaml = PresetLoader.ToYaml(baseOptions);
        (space, string spaceName, string spaceText) = LoadSpace();
        if (space.Parameters.Count > 20)
        {
            throw BadInputException.At(spaceName, 0, "parameters", "at most 20 parameters can be tuned at once");
        }

        CheckKeys(spaceName, spaceText);

        IReadOnlyList<LaneRecord> tuningTruth, holdoutTruth;
        bool overlap;
        (tuningTruth, holdoutTruth, overlap) = Split();
        try
        {
            (List<Sample> tuning, List<Sample> holdout) = LoadSamples(tuningTruth, holdoutTruth);
            stderr.WriteLine(string.Create(
                CultureInfo.InvariantCulture,
                $"tune: {tuning.Count} tuning and {holdout.Count} holdout frames{(overlap ? " (overlapping: --allow-overlap)" : string.Empty)}, {space.Parameters.Count} parameters, budget {request.Budget}, seed {request.Seed}, {request.Threads} thread(s); frames {(tuning.All(s => s.Frame is not null) ? "decoded once and kept in memory" : "decoded again for every trial (above the memory cap)")}"));
            return Search(baseOptions, spaceName, tuning, holdout, overlap);
        }
        finally
        {
            foreach (Mat m in decoded.Values)
            {
                m.Dispose();
            }

            decoded.Clear();
        }
    }

    private TuneSummary Search(PipelineOptions baseOptions, string spaceName, List<Sample> tuning, List<Sample> holdout, bool overlap)
    {
        string logPath = LogPathFor(request.Output);
        string header = LogHeader(tuning, baseOptions);
        List<Trial> previous = request.Resume ? ReadLog(logPath, header) : [];
        YamlMappingNode baseRoot = LoadYaml(baseYaml);
        var tuner = new Tuner(space, request.Budget, request.Seed, request.Threads)
        {
            // The base preset's own values are trial 0, so the result is never worse than the base on the tuning frames.
            Start = [.. space.Parameters.Select(p => double.Parse(((YamlScalarNode)Find(baseRoot, p.Key)!).Value!, NumberStyles.Float, CultureInfo.InvariantCulture))],
        };
        var clock = Stopwatch.StartNew();
        double best = previous.Count > 0 ? Tuner.Best(previous).Score : double.NegativeInfinity;
        if (previous.Count > 0)
        {
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"tune: resuming after {previous.Count} logged trial(s) from {logPath}"));
        }

        IReadOnlyList<Trial> trials;
        using (var log = new FileStream(logPath, previous.Count > 0 ? FileMode.Append : FileMode.Create, FileAccess.Write, FileShare.Read))
        {
            if (previous.Count == 0)
            {
                WriteLine(log, header);
            }

            try
            {
                trials = tuner.Run(
                    values => Objective(values, tuning),
                    previous,
                    trial =>
                    {
                        notes.TryGetValue(ValuesKey(trial.Values), out TrialNote? note);
                        WriteLine(log, TrialJson(trial, note));
                        best = Math.Max(best, trial.Score);
                        stderr.WriteLine(string.Create(
                            CultureInfo.InvariantCulture,
                            $"tune: trial {trial.Index + 1}/{request.Budget} ({trial.Phase}) {request.Objective} {trial.Score:0.0000}, best {best:0.0000}, {note?.Seconds ?? 0:0.00} s{(note?.Invalid is string why ? ", invalid: " + why : string.Empty)}"));
                    });
            }
            catch (AggregateException ex) when (ex.InnerExceptions.Count > 0 && ex.InnerExceptions[0] is BadInputException bad)
            {
                // A frame that became unreadable during the search (sets decoded again per trial): exit 3, not 1.
                throw bad;
            }
        }

        Trial winner = Tuner.Best(trials);
        if (winner.Score <= WorstScore)
        {
            throw BadInputException.At(spaceName, 0, null, "every trial gave an invalid preset or failed; narrow the ranges (reasons in " + logPath + ")");
        }

        PipelineOptions tuned = Apply(winner.Values, out _)!;
        double baseTuning = 0, baseHoldout = 0, tunedHoldout = 0;
        Parallel.Invoke(
            new ParallelOptions { MaxDegreeOfParallelism = request.Threads },
            () => baseTuning = Measure(baseOptions, tuning),
            () => baseHoldout = Measure(baseOptions, holdout),
            () => tunedHoldout = Measure(tuned, holdout));

        WritePreset(tuned, winner, spaceName, tuning.Count, holdout.Count, overlap, baseTuning, baseHoldout, tunedHoldout);
        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"tune: {trials.Count} trials in {clock.Elapsed.TotalSeconds:0.0} s; best trial {winner.Index} ({winner.Phase})"));
        return new TuneSummary(baseTuning, winner.Score, baseHoldout, tunedHoldout, tuning.Count, holdout.Count, overlap);
    }

    private (SearchSpace Space, string Name, string Text) LoadSpace()
    {
        if (request.SpacePath is string path)
        {
            if (!File.Exists(path))
            {
                throw BadInputException.At(path, 0, null, "no such search-space file");
            }

            string text = File.ReadAllText(path);
            return (SearchSpace.Parse(text, path), path, text);
        }

        using Stream stream = typeof(TuneRunner).Assembly.GetManifestResourceStream("LaneBaseline.TuneSpace.yaml")
            ?? throw new InvalidOperationException("the built-in search space is missing from the assembly");
        using var reader = new StreamReader(stream);
        string builtIn = reader.ReadToEnd();
        return (SearchSpace.Parse(builtIn, DefaultSpaceName), DefaultSpaceName, builtIn);
    }

    /// <summary>Every key of the space must name a scalar of the preset (checked before any frame is read).</summary>
    private void CheckKeys(string spaceName, string spaceText)
    {
        YamlMappingNode root = LoadYaml(baseYaml);
        foreach (TuneParameter p in space.Parameters)
        {
            if (Find(root, p.Key) is not YamlScalarNode scalar
                || !double.TryParse(scalar.Value, NumberStyles.Float, CultureInfo.InvariantCulture, out _))
            {
                long line = 0;
                string[] lines = spaceText.Split('\n');
                var pattern = new Regex(@"^\s*(-\s*)?key:\s*['""]?" + Regex.Escape(p.Key) + @"['""]?\s*(#.*)?$", RegexOptions.CultureInvariant, TimeSpan.FromSeconds(1));
                for (int i = 0; i < lines.Length && line == 0; i++)
                {
                    if (pattern.IsMatch(lines[i].TrimEnd('\r')))
                    {
                        line = i + 1;
                    }
                }

                throw BadInputException.At(spaceName, line, p.Key, "not a numeric preset key (keys are section.name as in configs/presets/default.yaml)");
            }
        }
    }

    private (IReadOnlyList<LaneRecord> Tuning, IReadOnlyList<LaneRecord> Holdout, bool Overlap) Split()
    {
        List<LaneRecord> all = ReadTruth(request.Truth);
        if (request.HoldoutTruth is string second)
        {
            List<LaneRecord> other = ReadTruth(second);
            var keys = all.Select(r => r.Frame).ToHashSet(StringComparer.Ordinal);
            string[] shared = [.. other.Where(r => keys.Contains(r.Frame)).Select(r => r.Frame)];
            if (shared.Length > 0 && !request.AllowOverlap)
            {
                throw new UsageException(string.Create(
                    CultureInfo.InvariantCulture,
                    $"{shared.Length} frame(s) of --holdout-truth are also in --truth (first: {shared[0]}); a holdout score on frames the search has seen overstates the result. Remove them, or pass --allow-overlap to report it anyway"));
            }

            return (all, other, shared.Length > 0);
        }

        double f = request.HoldoutFraction;
        var tuning = all.Where(r => !IsHoldout(r.Frame, f)).ToList();
        var holdout = all.Where(r => IsHoldout(r.Frame, f)).ToList();
        if (tuning.Count == 0)
        {
            throw new UsageException(string.Create(CultureInfo.InvariantCulture, $"--holdout {f} leaves no tuning frame among the {all.Count} frames of {request.Truth}; lower it"));
        }

        if (holdout.Count == 0)
        {
            if (!request.AllowOverlap)
            {
                throw new UsageException(string.Create(
                    CultureInfo.InvariantCulture,
                    $"--holdout {f} leaves no holdout frame among the {all.Count} frames of {request.Truth}, so the score would be reported on the frames it was tuned on; give a larger --holdout, a --holdout-truth file, or --allow-overlap to report on the tuning frames"));
            }

            return (tuning, tuning, true);
        }

        return (tuning, holdout, false);
    }

    /// <summary>Whether a frame is a holdout frame: the top 53 bits of FNV-1a 64 of its key, as a fraction, fall below <paramref name="fraction"/>.</summary>
    public static bool IsHoldout(string frameKey, double fraction) =>
        (ShardSpec.Fnv1a64(frameKey) >> 11) * (1.0 / (1UL << 53)) < fraction;

    private static List<LaneRecord> ReadTruth(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "no such truth file");
        }

        var records = new List<LaneRecord>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        using var reader = LaneFileReader.Open(path, sizeRequired: true);
        foreach (LaneRecord r in reader.ReadAll())
        {
            if (!seen.Add(r.Frame))
            {
                throw BadInputException.At(path, r.LineNumber, "frame", "frame '" + r.Frame + "' appears twice");
            }

            records.Add(r);
        }

        if (records.Count == 0)
        {
            throw BadInputException.At(path, 0, null, "the truth file holds no frame");
        }

        return records;
    }

    private (List<Sample> Tuning, List<Sample> Holdout) LoadSamples(IReadOnlyList<LaneRecord> tuningTruth, IReadOnlyList<LaneRecord> holdoutTruth)
    {
        var images = FrameListing.ListImages(request.Frames).ToDictionary(i => i.Key, StringComparer.Ordinal);
        long bytes = tuningTruth.Concat(holdoutTruth).DistinctBy(r => r.Frame).Sum(r => 3L * r.Width!.Value * r.Height!.Value);
        bool keep = bytes <= MemoryCapBytes;
        var tuning = new List<Sample>();
        var holdout = new List<Sample>();
        foreach ((IReadOnlyList<LaneRecord> set, List<Sample> into, string file) in new[] { (tuningTruth, tuning, request.Truth), (holdoutTruth, holdout, request.HoldoutTruth ?? request.Truth) })
        {
            foreach (LaneRecord r in set.OrderBy(r => r.Frame, StringComparer.Ordinal))
            {
                if (!images.TryGetValue(r.Frame, out FrameItem? item))
                {
                    throw BadInputException.At(file, r.LineNumber, "frame", "no image '" + r.Frame + "' under " + request.Frames);
                }

                if (keep && !decoded.ContainsKey(r.Frame))
                {
                    decoded.Add(r.Frame, Decode(item, r));
                }
                else if (!keep)
                {
                    // Too many pixels to keep: decode once now anyway, so a bad frame stops the run before any trial.
                    Decode(item, r).Dispose();
                }

                into.Add(new Sample(item with { TimestampSeconds = item.Index / ImageFps }, r, decoded.TryGetValue(r.Frame, out Mat? frame) ? frame : null));
            }
        }

        return (tuning, holdout);
    }

    private static Mat Decode(FrameItem item, LaneRecord truth)
    {
        Mat frame;
        try
        {
            frame = FrameLoader.Load(item.Path!, KnownPresets.Default.Limits);
        }
        catch (OpenCVException ex)
        {
            throw BadInputException.At(item.Path ?? item.Key, 0, null, ex.Message);
        }

        if (frame.Cols != truth.Width || frame.Rows != truth.Height)
        {
            string message = string.Create(CultureInfo.InvariantCulture, $"image size {frame.Cols}x{frame.Rows} differs from the truth's {truth.Width}x{truth.Height}");
            frame.Dispose();
            throw BadInputException.At(item.Path ?? item.Key, 0, null, message);
        }

        return frame;
    }

    private double Objective(IReadOnlyList<double> values, List<Sample> tuning)
    {
        long t0 = Stopwatch.GetTimestamp();
        PipelineOptions? options = Apply(values, out string? invalid);
        double score = WorstScore;
        if (options is not null)
        {
            try
            {
                score = Measure(options, tuning);
            }
            catch (Exception ex) when (ex is OpenCVException or ArgumentException or InvalidOperationException)
            {
                invalid = "the pipeline failed: " + ex.Message;
            }
        }

        notes[ValuesKey(values)] = new TrialNote(Stopwatch.GetElapsedTime(t0).TotalSeconds, invalid);
        return score;
    }

    /// <summary>Runs the pipeline over the samples in key order (tracking restarts per sequence) and returns the objective.</summary>
    private double Measure(PipelineOptions options, List<Sample> samples)
    {
        using var pipeline = new LanePipeline(options);
        using var rasterizer = new OpenCvLaneRasterizer();
        var scorer = new FrameScorer(rasterizer, new ScoreSettings());
        var tally = new ScoreTally(scorer.Thresholds);
        Sample? current = null;
        var runner = new FrameSequenceRunner(pipeline, _ => Decode(current!.Item, current.Truth));
        foreach (Sample s in samples)
        {
            current = s;
            FrameResult result = runner.Process(s.Item, s.Frame);
            var prediction = new LaneRecord
            {
                Frame = s.Item.Key,
                Width = s.Truth.Width,
                Height = s.Truth.Height,
                Lanes = result.Lanes,
            };
            tally.Add(scorer.Score(s.Truth, prediction));
        }

        return request.Objective switch
        {
            "mf1" => tally.MeanF1,
            "accuracy" => tally.PointAccuracy,
            _ => tally.At(IouThreshold.Half).F1,
        };
    }

    /// <summary>The base preset with the trial's values set by key path, or null (and the reason) when invalid.</summary>
    private PipelineOptions? Apply(IReadOnlyList<double> values, out string? invalid)
    {
        YamlMappingNode root = LoadYaml(baseYaml);
        for (int k = 0; k < space.Parameters.Count; k++)
        {
            TuneParameter p = space.Parameters[k];
            var node = (YamlScalarNode)Find(root, p.Key)!;
            node.Value = FormatValue(p, values[k]);
        }

        var doc = new YamlStream(new YamlDocument(root));
        using var writer = new StringWriter(CultureInfo.InvariantCulture);
        doc.Save(writer, assignAnchors: false);
        try
        {
            invalid = null;
            return PresetLoader.Parse(writer.ToString(), "trial preset");
        }
        catch (BadInputException ex)
        {
            invalid = ex.Message.Replace('\n', ' ');
            return null;
        }
    }

    private static string FormatValue(TuneParameter p, double v) =>
        p.WholeNumbers ? ((long)v).ToString(CultureInfo.InvariantCulture) : v.ToString("R", CultureInfo.InvariantCulture);

    private static YamlMappingNode LoadYaml(string text)
    {
        var stream = new YamlStream();
        using var reader = new StringReader(text);
        stream.Load(reader);
        return (YamlMappingNode)stream.Documents[0].RootNode;
    }

    private static YamlNode? Find(YamlMappingNode root, string keyPath)
    {
        YamlNode current = root;
        foreach (string part in keyPath.Split('.'))
        {
            if (current is not YamlMappingNode map || !map.Children.TryGetValue(new YamlScalarNode(part), out YamlNode? next))
            {
                return null;
            }

            current = next;
        }

        return current;
    }

    private static string ValuesKey(IReadOnlyList<double> values) =>
        string.Join(",", values.Select(v => v.ToString("R", CultureInfo.InvariantCulture)));

    /// <summary>First log line: what the trials depend on; <c>--resume</c> refuses a log with another header.</summary>
    private string LogHeader(List<Sample> tuning, PipelineOptions baseOptions)
    {
        string spaceText = string.Join("\n", space.Parameters.Select(p => string.Create(CultureInfo.InvariantCulture, $"{p.Key} {p.Min:R} {p.Max:R} {p.WholeNumbers} {p.Log}")));
        string frames = string.Join("\n", tuning.Select(s => s.Item.Key));
        using var buffer = new MemoryStream();
        using (var json = new Utf8JsonWriter(buffer))
        {
            json.WriteStartObject();
            json.WriteStartObject("run");
            json.WriteString("objective", request.Objective);
            json.WriteNumber("seed", request.Seed);
            json.WriteNumber("budget", request.Budget);
            json.WriteString("space", ShortHash(spaceText));
            json.WriteString("base", PresetLoader.Hash(baseOptions));
            json.WriteString("tuningFrames", ShortHash(frames));
            json.WriteEndObject();
            json.WriteEndObject();
        }

        return Encoding.UTF8.GetString(buffer.ToArray());
    }

    private static string ShortHash(string text) =>
        "sha256:" + Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(text)).AsSpan(0, 8));

    private string TrialJson(Trial trial, TrialNote? note)
    {
        using var buffer = new MemoryStream();
        using (var json = new Utf8JsonWriter(buffer))
        {
            json.WriteStartObject();
            json.WriteNumber("index", trial.Index);
            json.WriteString("phase", trial.Phase);
            json.WriteStartObject("values");
            for (int k = 0; k < space.Parameters.Count; k++)
            {
                json.WriteNumber(space.Parameters[k].Key, trial.Values[k]);
            }

            json.WriteEndObject();
            json.WriteNumber("objective", trial.Score);
            json.WriteNumber("seconds", Math.Round(note?.Seconds ?? 0, 3));
            if (note?.Invalid is string why)
            {
                json.WriteString("invalid", why);
            }

            json.WriteEndObject();
        }

        return Encoding.UTF8.GetString(buffer.ToArray());
    }

    private static void WriteLine(FileStream log, string line)
    {
        log.Write(Encoding.UTF8.GetBytes(line + "\n"));
        log.Flush(flushToDisk: false);
    }

    /// <summary>Reads a trial log for <c>--resume</c>: drops an unterminated last line, checks the header, returns the trials.</summary>
    private List<Trial> ReadLog(string path, string header)
    {
        var trials = new List<Trial>();
        if (!File.Exists(path))
        {
            return trials;
        }

        byte[] bytes = File.ReadAllBytes(path);
        int end = Array.LastIndexOf(bytes, (byte)'\n') + 1;
        if (end < bytes.Length)
        {
            AtomicFile.WriteAllBytes(path, bytes.AsSpan(0, end));
        }

        string[] lines = Encoding.UTF8.GetString(bytes, 0, end).Split('\n', StringSplitOptions.None)[..^1];
        if (lines.Length == 0)
        {
            return trials;
        }

        if (lines[0] != header)
        {
            throw BadInputException.At(path, 1, "run", "--resume: this log was written for another search (objective, seed, budget, space, base preset or tuning frames differ); delete it or drop --resume");
        }

        for (int i = 1; i < lines.Length; i++)
        {
            try
            {
                using JsonDocument doc = JsonDocument.Parse(lines[i]);
                JsonElement e = doc.RootElement;
                int index = e.GetProperty("index").GetInt32();
                if (index != trials.Count)
                {
                    throw BadInputException.At(path, i + 1, "index", string.Create(CultureInfo.InvariantCulture, $"expected trial {trials.Count}, found {index}"));
                }

                JsonElement values = e.GetProperty("values");
                double[] v = [.. space.Parameters.Select(p => values.GetProperty(p.Key).GetDouble())];
                trials.Add(new Trial(index, e.GetProperty("phase").GetString() ?? string.Empty, v, e.GetProperty("objective").GetDouble()));
            }
            catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
            {
                throw BadInputException.At(path, i + 1, null, "not a trial record: " + ex.Message);
            }
        }

        return trials;
    }

    private void WritePreset(
        PipelineOptions tuned, Trial winner, string spaceName, int tuningCount, int holdoutCount, bool overlap,
        double baseTuning, double baseHoldout, double tunedHoldout)
    {
        string objective = request.Objective switch
        {
            "mf1" => "mf1 (mean F1 over IoU 0.50:0.05:0.95)",
            "accuracy" => "accuracy (row-sampled point accuracy)",
            _ => "f1 (F1 at IoU 0.5)",
        };
        string split = request.HoldoutTruth is string ht
            ? "holdout frames from " + Path.GetFileName(ht)
            : string.Create(CultureInfo.InvariantCulture, $"holdout fraction {request.HoldoutFraction:R} by FNV-1a 64 of the frame key");
        var text = new StringBuilder();
        var inv = CultureInfo.InvariantCulture;
        text.Append("# Preset tuned by lanebaseline tune (docs/tune.md).\n");
        text.Append(inv, $"# objective: {objective}\n");
        text.Append(inv, $"# base preset: {request.ConfigSource}; search space: {(request.SpacePath is null ? spaceName : Path.GetFileName(spaceName))}; budget {request.Budget}; seed {request.Seed}\n");
        text.Append(inv, $"# date: {request.Date}\n");
        text.Append(inv, $"# frames: {tuningCount} tuning, {holdoutCount} holdout ({split}){(overlap ? "; HOLDOUT OVERLAPS TUNING (--allow-overlap)" : string.Empty)}\n");
        text.Append("#                 tuning   holdout\n");
        text.Append(inv, $"#   base preset   {baseTuning,6:0.0000}   {baseHoldout,7:0.0000}\n");
        text.Append(inv, $"#   tuned preset  {winner.Score,6:0.0000}   {tunedHoldout,7:0.0000}\n");
        text.Append(inv, $"# best trial {winner.Index} ({winner.Phase}): ");
        text.Append(string.Join(", ", space.Parameters.Select((p, k) => p.Key + "=" + FormatValue(p, winner.Values[k]))));
        text.Append('\n');
        text.Append(PresetLoader.ToYaml(tuned));
        using var file = new AtomicFile(request.Output);
        file.Writer.Write(text.ToString());
        file.Commit();
    }

    /// <summary>A labelled frame; <paramref name="Frame"/> is the decoded image borrowed from the runner's cache, or null to decode per use.</summary>
    private sealed record Sample(FrameItem Item, LaneRecord Truth, Mat? Frame);

    private sealed record TrialNote(double Seconds, string? Invalid);
}
