using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// Audits a prediction source without truth: image rules and baseline agreement per frame (in parallel batches, one
/// scorer per worker), temporal rules in file order. Streams the predictions (and the baseline, joined by frame key,
/// buffering only records that arrive out of order); findings and one small score per frame are kept in memory.
/// Results do not depend on the thread count.
/// </summary>
public sealed class AuditRun
{
    private const int BatchSize = 256;
    private readonly AuditSettings settings;

    /// <summary>Creates a run.</summary>
    public AuditRun(AuditSettings settings)
    {
        this.settings = settings;
    }

    /// <summary>Worker threads.</summary>
    public int Threads { get; init; } = 1;

    /// <summary>Called after each batch with the number of frames audited so far.</summary>
    public Action<long>? OnProgress { get; init; }

    /// <summary>
    /// Audit only this shard: frames whose sequence (<see cref="Sharding.SequenceKey"/>) hashes to it. Ordinals stay
    /// positions in the whole prediction file, so <c>merge</c> can rank the union exactly as one run would.
    /// </summary>
    public Sharding.ShardSpec? Shard { get; init; }

    /// <summary>Opens inputs (lane files by default).</summary>
    public LaneSourceOpener Opener { get; init; } = LaneSources.OpenLaneFile;

    /// <summary>Runs the audit.</summary>
    /// <param name="predPath">Predictions to audit.</param>
    /// <param name="baselinePath">Baseline predictions, or null.</param>
    /// <param name="rasterizerFactory">One rasterizer per worker (needed with a baseline); disposed at the end when disposable.</param>
    /// <param name="cancellationToken">Stops between batches.</param>
    public AuditResult Execute(string predPath, string? baselinePath, Func<ILaneRasterizer> rasterizerFactory, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(rasterizerFactory);
        var request = new LaneSourceRequest { Size = settings.Size };
        int workers = Math.Max(1, Threads);
        var scorers = new FrameScorer[workers];
        var rasterizers = new ILaneRasterizer?[workers];
        var findings = new List<AuditFinding>();
        var frames = new List<AuditFrameScore>();
        var result = new AuditResult();
        var temporal = new TemporalWindow();
        Geometry.GroundProjection? projection = settings.Camera?.ToProjection();
        AuditSettings imageSettings = settings.Camera is { } cam && settings.HorizonRow is null ? settings with { HorizonRow = cam.HorizonRowAtCentre() } : settings;
        try
        {
            if (baselinePath is not null)
            {
                var scoreSettings = new ScoreSettings();
                for (int w = 0; w < workers; w++)
                {
                    rasterizers[w] = rasterizerFactory();
                    scorers[w] = new FrameScorer(rasterizers[w]!, scoreSettings);
                }
            }

            using ILaneRecordSource pred = Opener(predPath, request);
            using ILaneRecordSource? baseline = baselinePath is null ? null : Opener(baselinePath, request);
            var pending = new Dictionary<string, LaneRecord>(StringComparer.Ordinal);
            var batch = new List<(LaneRecord Pred, LaneRecord? Base, long Ordinal, int Width, int Height, bool BreakBefore)>(BatchSize);
            var perFrame = new List<AuditFinding>[BatchSize];
            var views = new AuditFrame[BatchSize];
            long ordinal = 0;
            bool more = true, skipped = false; // skipped: a frame of another shard came since the last kept one
            while (more)
            {
                batch.Clear();
                while (batch.Count < BatchSize && (more = pred.TryRead(out LaneRecord r)))
                {
                    if (!InShard(r.Frame))
                    {
                        ordinal++;
                        skipped = true;
                        continue;
                    }

                    LaneRecord? b = baseline is null ? null : Join(baseline, pending, r.Frame);
                    (int width, int height) = SizeOf(pred.DisplayName, r, b);
                    batch.Add((r, b, ordinal++, width, height, skipped));
                    skipped = false;
                }

                cancellationToken.ThrowIfCancellationRequested();
                int n = batch.Count;
                int used = Math.Min(workers, Math.Max(1, n));
                void Work(int w)
                {
                    for (int i = w * n / used; i < (w + 1) * n / used; i++)
                    {
                        (LaneRecord p, LaneRecord? b, long o, int width, int height, _) = batch[i];
                        var list = new List<AuditFinding>();
                        var frame = new AuditFrame(p, o, width, height, imageSettings)
                        {
                            Ground = projection is Geometry.GroundProjection gp ? AuditFrame.GroundLanesOf(p, gp) : null,
                            Baseline = b is null ? null : Compare(scorers[w], p, b, width, height),
                        };
                        AuditRuleCatalogue.Check(frame, AuditRuleFamily.Image, list);
                        AuditRuleCatalogue.Check(frame, AuditRuleFamily.Ground, list);
                        AuditRuleCatalogue.Check(frame, AuditRuleFamily.Baseline, list);
                        views[i] = frame;
                        perFrame[i] = list;
                    }
                }

                if (used == 1)
                {
                    Work(0);
                }
                else
                {
                    Parallel.For(0, used, new ParallelOptions { MaxDegreeOfParallelism = used }, Work);
                }

                for (int i = 0; i < n; i++)
                {
                    if (!settings.Stills)
                    {
                        if (batch[i].BreakBefore)
                        {
                            temporal.Break();
                        }

                        temporal.Push(views[i]);
                        AuditRuleCatalogue.Check(views[i], AuditRuleFamily.Temporal, perFrame[i]);
                    }

                    findings.AddRange(perFrame[i]);
                    BaselineAgreement? agreement = views[i].Baseline;
                    if (agreement is not null)
                    {
                        result.ComparedFrames++;
                    }

                    frames.Add(new AuditFrameScore(batch[i].Pred.Frame, batch[i].Ordinal, 0, agreement is null ? null : 1 - agreement.F1));
                }

                result.Frames += n;
                OnProgress?.Invoke(ordinal);
            }

            result.InputFrames = ordinal;
        }
        finally
        {
            foreach (ILaneRasterizer? r in rasterizers)
            {
                (r as IDisposable)?.Dispose();
            }
        }

        Rank(result, findings, frames);
        return result;
    }

    /// <summary>Ranks findings and frames (worst frame first, ties by file position) into <paramref name="result"/>.</summary>
    internal static void Rank(AuditResult result, List<AuditFinding> findings, IEnumerable<AuditFrameScore> frames)
    {
        var badness = new Dictionary<long, double>();
        foreach (AuditFinding f in findings)
        {
            badness[f.Ordinal] = badness.GetValueOrDefault(f.Ordinal) + f.Severity switch { AuditSeverity.Error => 100, AuditSeverity.Warning => 10, _ => 1 };
        }

        var scored = frames
            .Select(f => f with { Score = badness.GetValueOrDefault(f.Ordinal) + (10 * (f.Disagreement ?? 0)) })
            .Where(f => f.Score > 0 || f.Disagreement is not null)
            .OrderByDescending(f => f.Score).ThenBy(f => f.Ordinal)
            .ToList();
        var rank = new Dictionary<long, int>();
        for (int i = 0; i < scored.Count; i++)
        {
            rank[scored[i].Ordinal] = i + 1;
        }

        var ordered = findings
            .OrderBy(f => rank[f.Ordinal])
            .ThenByDescending(f => f.Severity)
            .ThenBy(f => f.Rule, StringComparer.Ordinal)
            .ThenBy(f => f.Lane ?? -1)
            .ThenBy(f => f.OtherLane ?? -1)
            .ToList();
        result.Findings = ordered;
        result.Ranks = [.. ordered.Select(f => rank[f.Ordinal])];
        result.RankedFrames = scored;
    }

    private (int Width, int Height) SizeOf(string file, LaneRecord p, LaneRecord? b)
    {
        (int w, int h) = p.Width is int pw && p.Height is int ph ? (pw, ph)
            : b?.Width is int bw && b.Height is int bh ? (bw, bh)
            : settings.SizeWithoutRecordSize() ?? throw BadInputException.At(file, p.LineNumber, "width", $"frame '{p.Frame}' has no size: give --size WxH (or a baseline with sizes)");
        if (settings.Camera is { } c && (c.ImageWidth != w || c.ImageHeight != h))
        {
            throw BadInputException.At(file, p.LineNumber, "width", string.Create(CultureInfo.InvariantCulture, $"frame '{p.Frame}' is {w}x{h} but the camera file is for {c.ImageWidth}x{c.ImageHeight}"));
        }

        return (w, h);
    }

    /// <summary>The frame's agreement with the baseline's confident lanes, or null when the baseline has none here.</summary>
    private BaselineAgreement? Compare(FrameScorer scorer, LaneRecord pred, LaneRecord baseline, int width, int height)
    {
        var confident = baseline.Lanes.Where(l => l.Score is not double s || s >= settings.BaselineMinScore).ToList();
        if (confident.Count == 0)
        {
            return null; // the baseline is not confident here: no comparison
        }

        var reference = new LaneRecord { Frame = pred.Frame, Width = width, Height = height, Lanes = confident };
        FrameScore score = scorer.Score(reference, pred);
        int tp = score.IouF1.TruePositives[scorer.HalfIndex];
        return new BaselineAgreement(2.0 * tp / (confident.Count + pred.Lanes.Count), confident.Count, tp);
    }

    private bool InShard(string frame) => Shard is not Sharding.ShardSpec s || s.ContainsFrame(frame);

    private LaneRecord? Join(ILaneRecordSource baseline, Dictionary<string, LaneRecord> pending, string frame)
    {
        if (pending.Remove(frame, out LaneRecord? found))
        {
            return found;
        }

        while (baseline.TryRead(out LaneRecord r))
        {
            if (r.Frame == frame)
            {
                return r;
            }

            if (InShard(r.Frame))
            {
                pending[r.Frame] = r; // another shard's baseline records are never needed: drop them
            }
        }

        return null;
    }
}
