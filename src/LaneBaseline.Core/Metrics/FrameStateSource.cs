namespace LaneBaseline.Core.Metrics;

/// <summary>Where a shard state frame line comes from, for a metric unit's state reader: the header and the place for errors.</summary>
/// <param name="Path">The state file.</param>
/// <param name="Line">One-based line of the frame line.</param>
/// <param name="Header">The state's header.</param>
public sealed record FrameStateSource(string Path, long Line, ScoreStateHeader Header)
{
    /// <summary>The bad-input error for key <paramref name="key"/> of this line.</summary>
    public BadInputException Bad(string key, string problem) => BadInputException.At(Path, Line, key, problem);
}
