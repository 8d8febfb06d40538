namespace LaneBaseline.Core.Metrics.Coverage;

/// <summary>What <c>score</c> does with prediction records of frames the truth lacks (<c>--extra</c>).</summary>
public enum ExtraFramePolicy
{
    /// <summary>Left out of the scores, with a warning line.</summary>
    Ignore,

    /// <summary>Bad input (exit 3).</summary>
    Error,
}
