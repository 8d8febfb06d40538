using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Core.Metrics.Ground;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Scores one frame's predictions against its truth with every metric unit (<see cref="MetricCatalogue"/>): it
/// rasterises the lanes and makes the frame's one Hungarian assignment on IoU (<see cref="FrameAssignment"/>) once,
/// and each unit's per-frame computation reads it (IoU F1, the confidence sweep, calibration, road-plane errors);
/// point accuracy makes its own assignment on pair accuracy. Not thread-safe: one per worker.
/// </summary>
public sealed class FrameScorer
{
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

    /// <summary>The thresholds, in the order of <see cref="FrameIouF1.TruePositives"/>.</summary>
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
        FrameAssignment a = FrameAssignment.Measure(rasterizer, width, height, settings.LaneWidthFor(width), truth.Lanes, prediction?.Lanes ?? []);
        var found = new bool[a.Truth.Count];
        var hit = new bool[a.Pred.Count];
        for (int i = 0; i < found.Length; i++)
        {
            int j = a.Assignment[i];
            if (j >= 0 && a.Meets(IouThreshold.Half, i, j))
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

        // The rasterised IoU and its one assignment, read by every unit that works on pairs.
        FrameAssignment frame = FrameAssignment.Measure(rasterizer, width, height, settings.LaneWidthFor(width), t, p);
        (double[] laneScores, bool[] laneHits) = Calibration.ReliabilityTally.OfFrame(p, frame.Assignment, frame.Intersections, frame.TruthAreas, frame.PredAreas);

        return new FrameScore
        {
            Frame = truth.Frame,
            Tags = truth.Tags,
            Width = width,
            Height = height,
            TruthLanes = nt,
            PredLanes = np,
            IouF1 = FrameIouF1.Measure(frame, thresholds),
            Points = FramePointAccuracy.Measure(t, p, height, settings.ToleranceFor(width), rows, xs),
            Sweep = FrameConfidenceSweep.Measure(frame),
            LaneScores = laneScores,
            LaneHits = laneHits,
            Ground = ground?.Measure(t, p, frame.PairsAt(IouThreshold.Half)),
        };
    }
}
