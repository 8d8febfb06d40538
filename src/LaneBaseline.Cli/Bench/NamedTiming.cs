namespace LaneBaseline.Cli.Bench;

/// <summary>A named timing (a pipeline stage or a floor primitive).</summary>
internal sealed record NamedTiming(string Name, TimingStats Stats);
