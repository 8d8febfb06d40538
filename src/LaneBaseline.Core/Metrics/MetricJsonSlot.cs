namespace LaneBaseline.Core.Metrics;

/// <summary>Where a metric unit's part goes in a system's or a tag's object of the score JSON.</summary>
public enum MetricJsonSlot
{
    /// <summary>With the tally's metrics, after its lane counts (<c>iou_f1</c>, <c>point_accuracy</c>, <c>ground</c>, <c>coverage</c>).</summary>
    Tally,

    /// <summary>Last before <c>by_tag</c> (after the intervals and the confidence sweep of a system; right after the tally of a tag).</summary>
    Closing,
}
