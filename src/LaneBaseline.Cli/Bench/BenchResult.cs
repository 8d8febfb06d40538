namespace LaneBaseline.Cli.Bench;

/// <summary>A named timing (a pipeline stage or a floor primitive).</summary>
internal sealed record NamedTiming(string Name, TimingStats Stats);

/// <summary>The figures of one (size, workers) configuration.</summary>
internal sealed record BenchRun
{
    public required int Width { get; init; }

    public required int Height { get; init; }

    public required int Workers { get; init; }

    public required IReadOnlyList<NamedTiming> Stages { get; init; }

    public required TimingStats Pipeline { get; init; }

    public required IReadOnlyList<NamedTiming> FloorPrimitives { get; init; }

    public required TimingStats Floor { get; init; }

    /// <summary>Median over frames of pipeline ms / floor ms measured back to back on the same frame.</summary>
    public required double RatioMedianOfPairs { get; init; }

    /// <summary>Median pipeline ms / median floor ms.</summary>
    public required double RatioOfMedians { get; init; }

    /// <summary>Frames per second of a pipeline-only pass with <see cref="Workers"/> workers (wall clock).</summary>
    public required double FramesPerSecond { get; init; }

    public required double AllocatedBytesPerFrame { get; init; }

    public required long MaxAllocatedBytesPerFrame { get; init; }

    public required long? PeakRssBytes { get; init; }

    public required IReadOnlyList<string> PipelineFrameKeys { get; init; }

    public required IReadOnlyList<string> FloorFrameKeys { get; init; }
}

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
