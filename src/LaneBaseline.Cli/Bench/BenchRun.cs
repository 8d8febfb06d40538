namespace LaneBaseline.Cli.Bench;

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
