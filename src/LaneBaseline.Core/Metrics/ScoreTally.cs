using LaneBaseline.Core.Metrics.Ground;

namespace LaneBaseline.Core.Metrics;

/// <summary>Sums of per-frame counts over a set of frames (all frames, or the frames of one tag).</summary>
public sealed class ScoreTally
{
    private readonly IouThreshold[] thresholds;
    private int? width;
    private int? height;

    /// <summary>Creates an empty tally for the given thresholds (the order of <see cref="FrameScore.TruePositives"/>).</summary>
    public ScoreTally(IReadOnlyList<IouThreshold> thresholds)
    {
        this.thresholds = [.. thresholds];
        TruePositives = new long[this.thresholds.Length];
    }

    /// <summary>Frames added.</summary>
    public long Frames { get; private set; }

    /// <summary>Truth lanes over all frames.</summary>
    public long TruthLanes { get; private set; }

    /// <summary>Predicted lanes over all frames.</summary>
    public long PredLanes { get; private set; }

    /// <summary>True positives per threshold.</summary>
    public long[] TruePositives { get; }

    /// <summary>Sum of assigned pair accuracies.</summary>
    public double PointAccuracySum { get; private set; }

    /// <summary>Truth lanes matched by the point metric.</summary>
    public long PointMatched { get; private set; }

    /// <summary>True positives at IoU 0.50 per confidence cutoff.</summary>
    public long[] ConfidenceTruePositives { get; } = new long[FrameScorer.ConfidenceCutoffs];

    /// <summary>Kept predictions per confidence cutoff.</summary>
    public long[] ConfidencePredLanes { get; } = new long[FrameScorer.ConfidenceCutoffs];

    /// <summary>Metric-space error sums (present when a camera was given).</summary>
    public GroundTally? Ground { get; private set; }

    /// <summary>Calibration of the lanes' scores (reliability table, ECE, precision-recall over the score).</summary>
    public Calibration.ReliabilityTally Reliability { get; } = new();

    /// <summary>Whether any prediction carried a confidence.</summary>
    public bool AnyConfidence { get; private set; }

    /// <summary>Whether frames of different sizes were added.</summary>
    public bool MixedSizes { get; private set; }

    /// <summary>The common frame width, or null when none or mixed.</summary>
    public int? CommonWidth => MixedSizes ? null : width;

    /// <summary>The thresholds of <see cref="TruePositives"/>.</summary>
    public IReadOnlyList<IouThreshold> Thresholds => thresholds;

    /// <summary>Whether the set holds no truth and no prediction at all (everything then scores 1).</summary>
    public bool AllEmpty => TruthLanes == 0 && PredLanes == 0;

    /// <summary>Adds one frame.</summary>
    public void Add(FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        if (Frames == 0)
        {
            width = frame.Width;
            height = frame.Height;
        }
        else if (width != frame.Width || height != frame.Height)
        {
            MixedSizes = true;
        }

        Frames++;
        TruthLanes += frame.TruthLanes;
        PredLanes += frame.PredLanes;
        for (int k = 0; k < TruePositives.Length; k++)
        {
            TruePositives[k] += frame.TruePositives[k];
        }

        PointAccuracySum += frame.PointAccuracySum;
        PointMatched += frame.PointMatched;
        for (int k = 0; k < FrameScorer.ConfidenceCutoffs; k++)
        {
            ConfidenceTruePositives[k] += frame.ConfidenceTruePositives[k];
            ConfidencePredLanes[k] += frame.ConfidencePredLanes[k];
        }

        AnyConfidence |= frame.HasConfidence;
        Reliability.Add(frame);
        if (frame.Ground is { } g)
        {
            (Ground ??= new GroundTally(g.LateralCount.Length)).Add(g);
        }
    }

    /// <summary>Detection counts and rates at threshold index <paramref name="k"/>.</summary>
    public DetectionCounts At(int k) => DetectionCounts.From(TruePositives[k], PredLanes, TruthLanes);

    /// <summary>Detection counts at a threshold.</summary>
    public DetectionCounts At(IouThreshold t) => At(Array.IndexOf(thresholds, t));

    /// <summary>Mean F1 over 0.50, 0.55, …, 0.95.</summary>
    public double MeanF1
    {
        get
        {
            double sum = 0;
            foreach (IouThreshold t in IouThreshold.MeanF1Set)
            {
                sum += At(t).F1;
            }

            return sum / IouThreshold.MeanF1Set.Count;
        }
    }

    /// <summary>Point accuracy = Σ assigned pair accuracy / truth lanes.</summary>
    public double PointAccuracy => AllEmpty ? 1.0 : Metrics.Ratio(PointAccuracySum, TruthLanes);

    /// <summary>Unmatched predictions / predictions.</summary>
    public double PointFpRate => Metrics.Ratio(PredLanes - PointMatched, PredLanes);

    /// <summary>Unmatched truth lanes / truth lanes.</summary>
    public double PointFnRate => Metrics.Ratio(TruthLanes - PointMatched, TruthLanes);
}
