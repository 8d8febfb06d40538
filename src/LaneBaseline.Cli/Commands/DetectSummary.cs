namespace LaneBaseline.Cli.Commands;

/// <summary>What a detect run did.</summary>
internal sealed record DetectSummary(int Written, int Lanes, int Resumed, IReadOnlyList<string> Skipped, string? ConfigPath, double MsPerFrame);
