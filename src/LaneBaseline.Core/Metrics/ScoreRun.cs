using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics.Coverage;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Scores one or several prediction files against a truth file, streaming frame by frame. A first pass validates
/// every file completely (so bad input is reported before any output is written) and keeps only frame keys; the
/// second pass joins predictions to truth in truth order, buffering only records that arrive out of order.
/// </summary>
public sealed partial class ScoreRun
{
    private const int BatchSize = 256;

    private readonly string truthPath;

    private readonly IReadOnlyList<ScoredSystem> systems;

    private readonly ScoreSettings settings;

    /// <summary>Creates a run.</summary>
    public ScoreRun(string truthPath, IReadOnlyList<ScoredSystem> systems, ScoreSettings settings)
    {
        this.truthPath = truthPath;
        this.systems = systems;
        this.settings = settings;
    }

    /// <summary>Only frames of this shard are scored (all frames when null); validation still covers every frame.</summary>
    public Sharding.ShardSpec? Shard { get; init; }

    /// <summary>Number of records in the truth file (known after <see cref="Execute"/>).</summary>
    public int TruthFrames { get; private set; }

    /// <summary>Worker threads for per-frame scoring (results do not depend on it).</summary>
    public int Threads { get; init; } = 1;

    /// <summary>Called after each frame, in truth order, with that frame's score for every system.</summary>
    public Action<IReadOnlyList<FrameScore>>? OnFrame { get; init; }

    /// <summary>
    /// Opens truth and prediction paths (default: lane files only). The command line passes an opener that also
    /// reads instance-mask folders.
    /// </summary>
    public LaneSourceOpener Opener { get; init; } = LaneSources.OpenLaneFile;

    /// <summary>Called once every input has been validated, with the number of truth frames, before any frame is scored.</summary>
    public Action<int>? OnValidated { get; init; }

    /// <summary>Receives one-line notes about the inputs that are not errors (e.g. a prediction file with no records).</summary>
    public Action<string>? OnNote { get; init; }

    /// <summary>Truth frames without a prediction record: scored as no lanes (default) or bad input.</summary>
    public MissingFramePolicy Missing { get; init; } = MissingFramePolicy.Empty;

    /// <summary>Prediction records of frames the truth lacks: left out (default) or bad input.</summary>
    public ExtraFramePolicy Extra { get; init; } = ExtraFramePolicy.Ignore;

    /// <summary>Receives one-line warnings about coverage (missing or extra frames) under the lenient policies.</summary>
    public Action<string>? OnWarning { get; init; }

    /// <summary>Coverage of each system's prediction file (known after validation).</summary>
    public IReadOnlyList<FrameCoverage> Coverage { get; private set; } = [];

    /// <summary>Called with a progress line now and then.</summary>
    public Action<long, long>? OnProgress { get; init; }

    /// <summary>Runs the scoring.</summary>
    /// <param name="rasterizerFactory">Creates one rasterizer per worker; disposed at the end when disposable.</param>
    /// <param name="cancellationToken">Stops between batches.</param>
    public IReadOnlyList<SystemScore> Execute(Func<ILaneRasterizer> rasterizerFactory, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(rasterizerFactory);

        // Pass 1: validate everything, keep keys and sizes only.
        var truthIndex = new Dictionary<string, int>(StringComparer.Ordinal);
        var sizes = new List<(int W, int H)>();
        var truthRequest = new LaneSourceRequest { SizeRequired = true };
        var tagNames = new HashSet<string>(StringComparer.Ordinal);
        var cache = new RecordCache(systems.Count, KeepPoints);
        using (ILaneRecordSource truth = Opener(truthPath, truthRequest))
        {
            while (truth.TryRead(out LaneRecord r))
            {
                cache.KeepTruth(r);
                if (settings.Camera is { } cam && (cam.ImageWidth != r.Width || cam.ImageHeight != r.Height))
                {
                    throw BadInputException.At(truthPath, r.LineNumber, "width", string.Create(
                        CultureInfo.InvariantCulture,
                        $"frame '{r.Frame}' is {r.Width}x{r.Height} but the camera file describes {cam.ImageWidth}x{cam.ImageHeight} images"));
                }

                foreach (string tag in r.Tags)
                {
                    if (tagNames.Add(tag) && tagNames.Count > InputLimits.MaxDistinctTags)
                    {
                        throw BadInputException.At(truthPath, r.LineNumber, "tags", string.Create(
                            CultureInfo.InvariantCulture,
                            $"frame '{r.Frame}' brings the number of distinct tags above {InputLimits.MaxDistinctTags} (the documented limit; each tag gets its own breakdown per system)"));
                    }
                }

                truthIndex.Add(r.Frame, sizes.Count);
                sizes.Add((r.Width!.Value, r.Height!.Value));
            }
        }

        TruthFrames = truthIndex.Count;
        if (truthIndex.Count == 0)
        {
            throw BadInputException.At(truthPath, 0, null, "the truth file holds no records");
        }

        var reference = new Dictionary<string, (int Width, int Height)>(truthIndex.Count, StringComparer.Ordinal);
        foreach (KeyValuePair<string, int> kv in truthIndex)
        {
            reference.Add(kv.Key, sizes[kv.Value]);
        }

        var predRequest = new LaneSourceRequest { SizeRequired = false, Reference = reference };
        var predicted = new HashSet<int>[systems.Count];
        var coverage = new FrameCoverage[systems.Count];
        for (int s = 0; s < systems.Count; s++)
        {
            (predicted[s], coverage[s]) = ValidatePredictions(Opener, predRequest, systems[s].Path, truthIndex, sizes, OnNote, cache, s);
        }

        for (int s = 0; s < systems.Count; s++)
        {
            coverage[s] = CheckCoverage(systems[s].Path, coverage[s], predicted[s], truthIndex);
        }

        Coverage = coverage;

        OnValidated?.Invoke(truthIndex.Count);

        // Pass 2: score.
        IouThreshold[] thresholds = [.. settings.Thresholds];
        int halfIndex = Array.IndexOf(thresholds, IouThreshold.Half);
        var results = systems.Select(s => new SystemScore(s, thresholds)).ToArray();
        for (int s = 0; s < results.Length; s++)
        {
            results[s].Coverage = coverage[s];
        }

        int workers = Math.Max(1, Threads);
        var rasterizers = new ILaneRasterizer[workers];
        var scorers = new FrameScorer[workers];
        var readers = new List<ILaneRecordSource>();
        LaneRecord? t0 = null;
        try
        {
            for (int w = 0; w < workers; w++)
            {
                rasterizers[w] = rasterizerFactory();
                scorers[w] = new FrameScorer(rasterizers[w], settings);
            }

            // Inputs kept by pass 1 are not read again; the others are streamed a second time.
            ILaneRecordSource? truth = cache.Kept ? null : Opener(truthPath, truthRequest);
            if (truth is not null)
            {
                readers.Add(truth);
            }

            var joiners = new PredictionJoiner?[systems.Count];
            for (int s = 0; s < systems.Count && !cache.Kept; s++)
            {
                ILaneRecordSource r = Opener(systems[s].Path, predRequest);
                readers.Add(r);
                joiners[s] = new PredictionJoiner(r, truthIndex, predicted[s]);
            }

            var batch = new List<(LaneRecord Truth, LaneRecord?[] Preds, int Ordinal)>(BatchSize);
            var scored = new FrameScore[BatchSize][];
            long done = 0;
            int ordinal = 0;
            while (truth is null ? ordinal < cache.Truth.Count : truth.TryRead(out t0))
            {
                LaneRecord t = truth is null ? cache.Truth[ordinal] : t0!;
                var preds = new LaneRecord?[systems.Count];
                for (int s = 0; s < systems.Count; s++)
                {
                    preds[s] = joiners[s] is { } joiner ? joiner.Take(ordinal) : cache.Predictions[s]?[ordinal];
                }

                if (Shard is not { } shard || shard.ContainsFrame(t.Frame))
                {
                    batch.Add((t, preds, ordinal));
                }

                ordinal++;
                if (batch.Count == BatchSize)
                {
                    done += Flush(batch, scored, scorers, results, halfIndex, cancellationToken);
                    OnProgress?.Invoke(done, truthIndex.Count);
                }
            }

            done += Flush(batch, scored, scorers, results, halfIndex, cancellationToken);
            OnProgress?.Invoke(done, truthIndex.Count);
        }
        finally
        {
            foreach (ILaneRecordSource r in readers)
            {
                r.Dispose();
            }

            foreach (ILaneRasterizer r in rasterizers)
            {
                (r as IDisposable)?.Dispose();
            }
        }

        return results;
    }

    private int Flush(
        List<(LaneRecord Truth, LaneRecord?[] Preds, int Ordinal)> batch,
        FrameScore[][] scored,
        FrameScorer[] scorers,
        SystemScore[] results,
        int halfIndex,
        CancellationToken cancellationToken)
    {
        cancellationToken.ThrowIfCancellationRequested();
        int n = batch.Count;
        int workers = Math.Min(scorers.Length, Math.Max(1, n));
        void Work(int w)
        {
            int from = w * n / workers, to = (w + 1) * n / workers;
            for (int i = from; i < to; i++)
            {
                var row = new FrameScore[results.Length];
                for (int s = 0; s < results.Length; s++)
                {
                    row[s] = scorers[w].Score(batch[i].Truth, batch[i].Preds[s]);
                    row[s].Ordinal = batch[i].Ordinal;
                }

                scored[i] = row;
            }
        }

        if (workers == 1)
        {
            Work(0);
        }
        else
        {
            Parallel.For(0, workers, new ParallelOptions { MaxDegreeOfParallelism = workers }, Work);
        }

        for (int i = 0; i < n; i++)
        {
            Accumulate(results, scored[i], halfIndex);
            OnFrame?.Invoke(scored[i]);
        }

        batch.Clear();
        return n;
    }

    /// <summary>Creates empty per-system results for replaying stored frame scores (used by merge).</summary>
    public static SystemScore[] CreateResults(IReadOnlyList<ScoredSystem> systems, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        IouThreshold[] thresholds = [.. settings.Thresholds];
        return [.. systems.Select(s => new SystemScore(s, thresholds))];
    }

    /// <summary>Adds one frame's scores (one per system) to the results, in truth order.</summary>
    public static void Accumulate(SystemScore[] results, IReadOnlyList<FrameScore> row, int halfIndex)
    {
        ArgumentNullException.ThrowIfNull(results);
        ArgumentNullException.ThrowIfNull(row);
        for (int s = 0; s < results.Length; s++)
        {
            FrameScore f = row[s];
            results[s].Overall.Add(f);
            results[s].Series.Add(f, halfIndex);
            int[]? meanF1Indices = null;
            foreach (string tag in f.Tags.Distinct(StringComparer.Ordinal))
            {
                if (!results[s].ByTag.TryGetValue(tag, out ScoreTally? tally))
                {
                    tally = new ScoreTally(results[s].Overall.IouF1.Thresholds);
                    results[s].ByTag.Add(tag, tally);
                }

                tally.Add(f);
                if (!results[s].TagSeries.TryGetValue(tag, out BootstrapSeries? series))
                {
                    series = new BootstrapSeries();
                    results[s].TagSeries.Add(tag, series);
                }

                IReadOnlyList<IouThreshold> th = results[s].Overall.IouF1.Thresholds;
                meanF1Indices ??= [.. IouThreshold.MeanF1Set.Select(t => Enumerable.Range(0, th.Count).First(i => th[i] == t))];
                series.Add(f, halfIndex, meanF1Indices);
            }
        }
    }

    /// <summary>
    /// Most lane points (truth and every prediction file together) that pass 1 keeps in memory for pass 2, so inputs
    /// of up to about this size are parsed once (16 bytes a point plus the records: roughly 100 MB at the limit); larger
    /// inputs are streamed a second time, so memory stays bounded whatever the number of frames.
    /// </summary>
    public const long KeepBudgetPoints = 4_000_000;

    /// <summary>Point budget of the records kept by pass 1 (<see cref="KeepBudgetPoints"/>; 0 streams every input twice).</summary>
    public long KeepPoints { get; init; } = KeepBudgetPoints;
}
