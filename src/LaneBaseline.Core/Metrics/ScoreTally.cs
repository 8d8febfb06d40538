using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Core.Metrics.Ground;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;

namespace LaneBaseline.Core.Metrics;

/// <summary>Sums of per-frame counts over a set of frames (all frames, or the frames of one tag).</summary>
public sealed class ScoreTally
{
    private int? width;
    private int? height;

    /// <summary>Creates an empty tally for the given thresholds (the order of <see cref="FrameIouF1.TruePositives"/>).</summary>
    public ScoreTally(IReadOnlyList<IouThreshold> thresholds)
    {
        IouF1 = new IouF1Tally(thresholds);
    }

    /// <summary>Frames added.</summary>
    public long Frames { get; private set; }

    /// <summary>Truth lanes over all frames.</summary>
    public long TruthLanes { get; private set; }

    /// <summary>Predicted lanes over all frames.</summary>
    public long PredLanes { get; private set; }

    /// <summary>The rasterised-IoU detection counts over the frames (F1 per threshold, mF1).</summary>
    public IouF1Tally IouF1 { get; }

    /// <summary>The row-sampled point accuracy over the frames.</summary>
    public PointAccuracyTally Points { get; } = new();

    /// <summary>The confidence sweep over the frames.</summary>
    public ConfidenceSweepTally Sweep { get; } = new();

    /// <summary>Metric-space error sums (present when a camera was given).</summary>
    public GroundTally? Ground { get; private set; }

    /// <summary>Calibration of the lanes' scores (reliability table, ECE, precision-recall over the score).</summary>
    public Calibration.ReliabilityTally Reliability { get; } = new();

    /// <summary>Whether frames of different sizes were added.</summary>
    public bool MixedSizes { get; private set; }

    /// <summary>The common frame width, or null when none or mixed.</summary>
    public int? CommonWidth => MixedSizes ? null : width;

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
        IouF1.Add(frame);
        Points.Add(frame);
        Sweep.Add(frame);
        Reliability.Add(frame);
        if (frame.Ground is { } g)
        {
            (Ground ??= new GroundTally(g.LateralCount.Length)).Add(g);
        }
    }
}
