namespace LaneBaseline.Core.Metrics.Coverage;

/// <summary>What <c>score</c> does with truth frames that have no prediction record (<c>--missing</c>).</summary>
public enum MissingFramePolicy
{
    /// <summary>Scored as predicting no lanes (docs/metrics.md), with a warning line.</summary>
    Empty,

    /// <summary>Bad input (exit 3).</summary>
    Error,
}
