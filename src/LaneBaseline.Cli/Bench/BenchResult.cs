namespace LaneBaseline.Cli.Bench;

/// <summary>Everything one bench run measured.</summary>
internal sealed record BenchResult
{
    public required MachineInfo Machine { get; init; }

    /// <summary>"render" or "frames".</summary>
    public required string Source { get; init; }

    public string? FramesPath { get; init; }

    public ulong? Seed { get; init; }

    public required IReadOnlyList<string> FrameKeys { get; init; }

    public required int SourceWidth { get; init; }

    public required int SourceHeight { get; init; }

    public required TimingStats Decode { get; init; }

    public required string Config { get; init; }

    public required int Warmup { get; init; }

    public required int Passes { get; init; }

    public required IReadOnlyList<BenchRun> Runs { get; init; }
}
