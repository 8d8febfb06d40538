using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics.Ground;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Scores one frame's predictions against its truth with both metrics of docs/metrics.md: rasterised-IoU
/// matching (one Hungarian assignment maximising total IoU, applied at every threshold) and row-sampled point
/// accuracy (a second Hungarian assignment maximising total pair accuracy). Not thread-safe: one per worker.
/// </summary>
public sealed class FrameScorer
{
    /// <summary>Number of confidence cutoffs (0.00, 0.05, …, 0.95).</summary>
    public const int ConfidenceCutoffs = 20;

    private readonly ILaneRasterizer rasterizer;
    private readonly ScoreSettings settings;
    private readonly IouThreshold[] thresholds;
    private readonly List<int> rows = [];
    private readonly List<double> xs = [];
    private readonly GroundErrors? ground;

    /// <summary>Creates a scorer on a rasterizer the caller owns.</summary>
    public FrameScorer(ILaneRasterizer rasterizer, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        this.rasterizer = rasterizer;
        this.settings = settings;
        thresholds = [.. settings.Thresholds];
        HalfIndex = Array.IndexOf(thresholds, IouThreshold.Half);
        ground = settings.Camera is null ? null : new GroundErrors(settings.Camera);
    }

    /// <summary>Position of IoU 0.50 in <see cref="Thresholds"/>.</summary>
    public int HalfIndex { get; }

    /// <summary>The thresholds, in the order of <see cref="FrameScore.TruePositives"/>.</summary>
    public IReadOnlyList<IouThreshold> Thresholds => thresholds;

    /// <summary>
    /// Which lanes count at IoU 0.50 in one frame (the same rasterisation and Hungarian assignment as
    /// <see cref="Score"/>): per truth lane whether it was found, per predicted lane whether it is a true positive.
    /// For drawing a few frames (galleries), not for scoring.
    /// </summary>
    public (bool[] TruthFound, bool[] PredHit) MatchAtHalf(LaneRecord truth, LaneRecord? prediction)
    {
        ArgumentNullException.ThrowIfNull(truth);
        int width = truth.Width ?? throw new ArgumentException("truth record without width", nameof(truth));
        int height = truth.Height ?? throw new ArgumentException("truth record without height", nameof(truth));
        IReadOnlyList<Lane> t = truth.Lanes;
        IReadOnlyList<Lane> p = prediction?.Lanes ?? [];
        int nt = t.Count, np = p.Count;
        var found = new bool[nt];
        var hit = new bool[np];
        if (nt == 0 || np == 0)
        {
            return (found, hit);
        }

        var inter = new long[nt * np];
        var areaT = new long[nt];
        var areaP = new long[np];
        rasterizer.Measure(width, height, settings.LaneWidthFor(width), t, p, inter, areaT, areaP);
        var iou = new double[nt * np];
        for (int k = 0; k < iou.Length; k++)
        {
            long union = areaT[k / np] + areaP[k % np] - inter[k];
            iou[k] = union > 0 ? (double)inter[k] / union : 0.0;
        }

        int[] assign = Hungarian.Maximize(iou, nt, np);
        for (int i = 0; i < nt; i++)
        {
            int j = assign[i];
            if (j >= 0 && IouThreshold.Half.IsMetBy(inter[(i * np) + j], areaT[i] + areaP[j] - inter[(i * np) + j]))
            {
                found[i] = true;
                hit[j] = true;
            }
        }

        return (found, hit);
    }

    /// <summary>Scores a frame. <paramref name="prediction"/> null means the frame predicts no lanes.</summary>
    /// <param name="truth">Truth record with width and height.</param>
    /// <param name="prediction">Prediction record, or null.</param>
    public FrameScore Score(LaneRecord truth, LaneRecord? prediction)
    {
        ArgumentNullException.ThrowIfNull(truth);
        int width = truth.Width ?? throw new ArgumentException("truth record without width", nameof(truth));
        int height = truth.Height ?? throw new ArgumentException("truth record without height", nameof(truth));
        IReadOnlyList<Lane> t = truth.Lanes;
        IReadOnlyList<Lane> p = prediction?.Lanes ?? [];
        int nt = t.Count, np = p.Count;

        // --- Rasterised IoU ---
        var inter = new long[nt * np];
        var areaT = new long[nt];
        var areaP = new long[np];
        if (nt > 0 && np > 0)
        {
            rasterizer.Measure(width, height, settings.LaneWidthFor(width), t, p, inter, areaT, areaP);
        }

        var iou = new double[nt * np];
        for (int i = 0; i < nt; i++)
        {
            for (int j = 0; j < np; j++)
            {
                long union = areaT[i] + areaP[j] - inter[(i * np) + j];
                iou[(i * np) + j] = union > 0 ? (double)inter[(i * np) + j] / union : 0.0;
            }
        }

        int[] assign = Hungarian.Maximize(iou, nt, np);
        var tp = new int[thresholds.Length];
        var assigned = new List<double>(Math.Min(nt, np));
        var halfPairs = ground is null ? null : new List<(int, int)>();
        for (int i = 0; i < nt; i++)
        {
            int j = assign[i];
            if (j < 0)
            {
                continue;
            }

            assigned.Add(iou[(i * np) + j]);
            long n = inter[(i * np) + j];
            long u = areaT[i] + areaP[j] - n;
            if (halfPairs is not null && IouThreshold.Half.IsMetBy(n, u))
            {
                halfPairs.Add((i, j));
            }

            for (int k = 0; k < thresholds.Length; k++)
            {
                if (thresholds[k].IsMetBy(n, u))
                {
                    tp[k]++;
                }
            }
        }

        (double[] laneScores, bool[] laneHits) = Calibration.ReliabilityTally.OfFrame(p, assign, inter, areaT, areaP);

        // --- Precision-recall over confidence (IoU 0.50) ---
        var confTp = new int[ConfidenceCutoffs];
        var confPred = new int[ConfidenceCutoffs];
        bool hasConfidence = false;
        foreach (Lane lane in p)
        {
            hasConfidence |= lane.Score.HasValue;
        }

        if (!hasConfidence)
        {
            Array.Fill(confTp, tp[HalfIndex]);
            Array.Fill(confPred, np);
        }
        else
        {
            ScoreByConfidence(p, nt, np, iou, inter, areaT, areaP, confTp, confPred);
        }

        // --- Row-sampled point accuracy ---
        double baseTolerance = settings.ToleranceFor(width);
        var correct = new int[nt * np];
        var samples = new int[nt];
        var pairAcc = new double[nt * np];
        for (int i = 0; i < nt; i++)
        {
            PointAccuracy.SampleRows(t[i].Points, height, rows, xs);
            samples[i] = rows.Count;
            if (rows.Count == 0)
            {
                continue;
            }

            double tol = PointAccuracy.Tolerance(baseTolerance, PointAccuracy.FitSlope(rows, xs));
            for (int j = 0; j < np; j++)
            {
                int c = PointAccuracy.CountCorrect(rows, xs, tol, p[j].Points);
                correct[(i * np) + j] = c;
                pairAcc[(i * np) + j] = (double)c / rows.Count;
            }
        }

        int[] pointAssign = Hungarian.Maximize(pairAcc, nt, np);
        double accSum = 0;
        int matched = 0;
        for (int i = 0; i < nt; i++)
        {
            int j = pointAssign[i];
            if (j < 0)
            {
                continue;
            }

            accSum += pairAcc[(i * np) + j];
            if (PointAccuracy.IsMatched(correct[(i * np) + j], samples[i]))
            {
                matched++;
            }
        }

        return new FrameScore
        {
            Frame = truth.Frame,
            Tags = truth.Tags,
            Width = width,
            Height = height,
            TruthLanes = nt,
            PredLanes = np,
            TruePositives = tp,
            AssignedIous = [.. assigned],
            PointAccuracySum = accSum,
            PointMatched = matched,
            ConfidenceTruePositives = confTp,
            ConfidencePredLanes = confPred,
            HasConfidence = hasConfidence,
            LaneScores = laneScores,
            LaneHits = laneHits,
            Ground = ground?.Measure(t, p, halfPairs!),
        };
    }

    private static void ScoreByConfidence(
        IReadOnlyList<Lane> p, int nt, int np, double[] iou, long[] inter, long[] areaT, long[] areaP, int[] confTp, int[] confPred)
    {
        var keep = new List<int>(np);
        for (int k = 0; k < ConfidenceCutoffs; k++)
        {
            decimal cutoff = k * 0.05m;
            keep.Clear();
            for (int j = 0; j < np; j++)
            {
                if (p[j].Score is not double s || (decimal)s >= cutoff)
                {
                    keep.Add(j);
                }
            }

            confPred[k] = keep.Count;
            if (nt == 0 || keep.Count == 0)
            {
                continue;
            }

            var sub = new double[nt * keep.Count];
            for (int i = 0; i < nt; i++)
            {
                for (int c = 0; c < keep.Count; c++)
                {
                    sub[(i * keep.Count) + c] = iou[(i * np) + keep[c]];
                }
            }

            int[] a = Hungarian.Maximize(sub, nt, keep.Count);
            for (int i = 0; i < nt; i++)
            {
                if (a[i] >= 0)
                {
                    int j = keep[a[i]];
                    long n = inter[(i * np) + j];
                    if (IouThreshold.Half.IsMetBy(n, areaT[i] + areaP[j] - n))
                    {
                        confTp[k]++;
                    }
                }
            }
        }
    }
}
