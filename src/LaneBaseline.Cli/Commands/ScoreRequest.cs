using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Cli.Commands;

/// <summary>Everything a score or merge run writes with.</summary>
internal sealed record ScoreRequest(
    string TruthPath,
    IReadOnlyList<ScoredSystem> Systems,
    ScoreSettings Settings,
    int Resamples,
    ulong Seed,
    int Threads,
    string? JsonPath,
    string? CsvPath,
    double? MinF1)
{
    /// <summary>HTML report path and optional frames folder for its gallery.</summary>
    public (string Path, string? FramesDir)? Report { get; init; }
}
