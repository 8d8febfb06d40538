namespace LaneBaseline.Core.Metrics;

/// <summary>Where a metric unit's part goes in a system's or a tag's object of the score JSON.</summary>
public enum MetricJsonSlot
{
    /// <summary>Right after the image-space blocks of the tally (<c>iou_f1</c>, <c>point_accuracy</c>).</summary>
    Tally,

    /// <summary>Last before <c>by_tag</c> (after the intervals and the confidence sweep of a system; right after the tally of a tag).</summary>
    Closing,
}
