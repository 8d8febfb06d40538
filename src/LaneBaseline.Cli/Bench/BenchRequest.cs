using LaneBaseline.Core.Options;

namespace LaneBaseline.Cli.Bench;

/// <summary>Everything one bench run needs, parsed and checked.</summary>
internal sealed record BenchRequest
{
    /// <summary>Frames to read (folder, list, image or video), or null to render <see cref="RenderCount"/> scenes.</summary>
    public string? FramesPath { get; init; }

    public int RenderCount { get; init; } = 24;

    public ulong Seed { get; init; } = 1;

    /// <summary>Processing sizes; empty means each frame's own size (all frames must then share one size).</summary>
    public IReadOnlyList<(int Width, int Height)> Sizes { get; init; } = [];

    public IReadOnlyList<int> Threads { get; init; } = [1];

    public required PipelineOptions Options { get; init; }

    public required string ConfigSource { get; init; }

    /// <summary>Frame calls per worker before measuring (not recorded).</summary>
    public int Warmup { get; init; } = 5;

    /// <summary>Measured passes over the frames.</summary>
    public int Passes { get; init; } = 3;

    /// <summary>Most frames decoded (they are held in memory).</summary>
    public int MaxFrames { get; init; } = DefaultMaxFrames;

    /// <summary>Most frames held when <c>--max-frames</c> is not given.</summary>
    public const int DefaultMaxFrames = 60;

    /// <summary>Most bytes the decoded frames and their resized copies may take together (default <see cref="BenchRunner.MemoryBudgetBytes"/>).</summary>
    public long MemoryBudgetBytes { get; init; } = BenchRunner.MemoryBudgetBytes;
}
