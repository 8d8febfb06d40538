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
internal sealed partial class TuneRunner
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

    /// <summary>Path of the trial log written beside the output preset (<c>tune.trials.jsonl</c> in the current folder when the preset goes to standard output).</summary>
    public static string LogPathFor(string output) => StandardStreams.IsDash(output) ? "tune.trials.jsonl" : output + ".trials.jsonl";

    public TuneSummary Run()
    {
        if (!StandardStreams.IsDash(request.Output) && Path.GetDirectoryName(Path.GetFullPath(request.Output)) is string outDir)
        {
            Directory.CreateDirectory(outDir); // a missing output folder is created, as for every output
        }

        PipelineOptions baseOptions = KnownPresets.Resolve(request.ConfigSource, stderr);
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
        List<Trial> previous = request.Resume ? ReadLog(logPath, header, LogHeader(tuning, baseOptions, legacy: true)) : [];
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
