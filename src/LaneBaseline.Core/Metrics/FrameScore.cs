using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Core.Metrics.Ground;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;

namespace LaneBaseline.Core.Metrics;

/// <summary>The scores of one frame: the counts every aggregate and bootstrap resample is built from.</summary>
public sealed class FrameScore
{
    /// <summary>Zero-based position of the frame in the truth file.</summary>
    public int Ordinal { get; internal set; }

    /// <summary>Frame key.</summary>
    public required string Frame { get; init; }

    /// <summary>Tags of the truth record.</summary>
    public required IReadOnlyList<string> Tags { get; init; }

    /// <summary>Frame width in pixels.</summary>
    public int Width { get; init; }

    /// <summary>Frame height in pixels.</summary>
    public int Height { get; init; }

    /// <summary>Truth lanes in the frame.</summary>
    public int TruthLanes { get; init; }

    /// <summary>Predicted lanes in the frame.</summary>
    public int PredLanes { get; init; }

    /// <summary>The rasterised-IoU detection counts of the frame (<see cref="FrameIouF1"/>).</summary>
    public FrameIouF1 IouF1 { get; set; } = FrameIouF1.Empty;

    /// <summary>The row-sampled point accuracy of the frame (<see cref="FramePointAccuracy"/>).</summary>
    public FramePointAccuracy Points { get; set; } = FramePointAccuracy.Empty;

    /// <summary>The confidence sweep of the frame (<see cref="FrameConfidenceSweep"/>).</summary>
    public FrameConfidenceSweep Sweep { get; set; } = FrameConfidenceSweep.Empty;

    /// <summary>Metric-space errors when a camera is given, else null.</summary>
    public FrameGroundErrors? Ground { get; set; }

    /// <summary>Scores of the predicted lanes that carry one, in file order (the calibration metric's input).</summary>
    public double[] LaneScores { get; set; } = [];

    /// <summary>Per entry of <see cref="LaneScores"/>: whether that lane is a true positive at IoU 0.50.</summary>
    public bool[] LaneHits { get; set; } = [];
}
