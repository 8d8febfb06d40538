using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// The rasterised overlap of a frame's truth and predicted lanes and its one Hungarian assignment maximising total
/// IoU (docs/metrics.md section 1), computed once per frame by <see cref="FrameScorer"/> and read by every metric unit
/// that works on truth/prediction pairs (IoU F1, the confidence sweep, calibration, the road-plane errors).
/// </summary>
public sealed class FrameAssignment
{
    private FrameAssignment(IReadOnlyList<Lane> truth, IReadOnlyList<Lane> pred)
    {
        Truth = truth;
        Pred = pred;
        int nt = truth.Count, np = pred.Count;
        Intersections = new long[nt * np];
        TruthAreas = new long[nt];
        PredAreas = new long[np];
        Iou = new double[nt * np];
        Assignment = [];
    }

    /// <summary>Truth lanes of the frame.</summary>
    public IReadOnlyList<Lane> Truth { get; }

    /// <summary>Predicted lanes of the frame.</summary>
    public IReadOnlyList<Lane> Pred { get; }

    /// <summary>Intersection pixel counts, truth-major (<c>[i * predicted + j]</c>).</summary>
    public long[] Intersections { get; }

    /// <summary>Footprint of each truth lane in pixels.</summary>
    public long[] TruthAreas { get; }

    /// <summary>Footprint of each predicted lane in pixels.</summary>
    public long[] PredAreas { get; }

    /// <summary>IoU of each truth/prediction pair, truth-major (0 when the union is empty).</summary>
    public double[] Iou { get; }

    /// <summary>Per truth lane the assigned prediction's index, or −1.</summary>
    public int[] Assignment { get; private set; }

    /// <summary>Union of truth lane <paramref name="i"/> and prediction <paramref name="j"/> in pixels.</summary>
    public long Union(int i, int j) => TruthAreas[i] + PredAreas[j] - Intersections[(i * Pred.Count) + j];

    /// <summary>Whether the pair (<paramref name="i"/>, <paramref name="j"/>) meets a threshold (compared exactly on the pixel counts).</summary>
    public bool Meets(IouThreshold threshold, int i, int j) => threshold.IsMetBy(Intersections[(i * Pred.Count) + j], Union(i, j));

    /// <summary>The assigned pairs (truth index, prediction index) that meet a threshold, in truth order.</summary>
    public List<(int Truth, int Pred)> PairsAt(IouThreshold threshold)
    {
        var pairs = new List<(int Truth, int Pred)>();
        for (int i = 0; i < Assignment.Length; i++)
        {
            if (Assignment[i] is int j and >= 0 && Meets(threshold, i, j))
            {
                pairs.Add((i, j));
            }
        }

        return pairs;
    }

    /// <summary>Rasterises the lanes of a frame, computes every pair's IoU and assigns them.</summary>
    /// <param name="rasterizer">The rasteriser (not thread-safe: one per worker).</param>
    /// <param name="width">Frame width in pixels.</param>
    /// <param name="height">Frame height in pixels.</param>
    /// <param name="laneWidthPx">Rasterised lane width in pixels.</param>
    /// <param name="truth">Truth lanes.</param>
    /// <param name="pred">Predicted lanes.</param>
    public static FrameAssignment Measure(ILaneRasterizer rasterizer, int width, int height, int laneWidthPx, IReadOnlyList<Lane> truth, IReadOnlyList<Lane> pred)
    {
        ArgumentNullException.ThrowIfNull(rasterizer);
        ArgumentNullException.ThrowIfNull(truth);
        ArgumentNullException.ThrowIfNull(pred);
        var a = new FrameAssignment(truth, pred);
        int nt = truth.Count, np = pred.Count;
        if (nt > 0 && np > 0)
        {
            rasterizer.Measure(width, height, laneWidthPx, truth, pred, a.Intersections, a.TruthAreas, a.PredAreas);
        }

        for (int i = 0; i < nt; i++)
        {
            for (int j = 0; j < np; j++)
            {
                long union = a.Union(i, j);
                a.Iou[(i * np) + j] = union > 0 ? (double)a.Intersections[(i * np) + j] / union : 0.0;
            }
        }

        a.Assignment = Hungarian.Maximize(a.Iou, nt, np);
        return a;
    }
}
