namespace LaneBaseline.Core.Metrics;

/// <summary>The metric a <see cref="ScoreGate"/> reads.</summary>
public enum GateMetric
{
    /// <summary>F1 at an IoU threshold.</summary>
    F1,

    /// <summary>Precision at an IoU threshold.</summary>
    Precision,

    /// <summary>Recall at an IoU threshold.</summary>
    Recall,

    /// <summary>Mean F1 over 0.50:0.05:0.95.</summary>
    MeanF1,

    /// <summary>Row-sampled point accuracy.</summary>
    Accuracy,
}
