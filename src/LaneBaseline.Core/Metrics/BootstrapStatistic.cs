namespace LaneBaseline.Core.Metrics;

/// <summary>The four statistics the intervals are given for.</summary>
public enum BootstrapStatistic
{
    /// <summary>F1 at IoU 0.50.</summary>
    F1,

    /// <summary>Precision at IoU 0.50.</summary>
    Precision,

    /// <summary>Recall at IoU 0.50.</summary>
    Recall,

    /// <summary>Row-sampled point accuracy.</summary>
    Accuracy,
}
