using LaneBaseline.Core.Options;

namespace LaneBaseline.Cli.Commands;

/// <summary>Everything one detect run needs, parsed and checked.</summary>
internal sealed record DetectRequest
{
    public required string Input { get; init; }

    public required string Output { get; init; }

    public required PipelineOptions Options { get; init; }

    public required string ConfigSource { get; init; }

    public string? OverlaysDir { get; init; }

    public string? StagesDir { get; init; }

    public int StagesEvery { get; init; } = 1;

    public int Threads { get; init; } = 1;

    public int ShardIndex { get; init; }

    public int ShardCount { get; init; } = 1;

    public bool Resume { get; init; }

    public bool KeepGoing { get; init; }

    /// <summary>Whether a frames-folder scan enters symbolic links to folders (<c>--follow-links</c>).</summary>
    public bool FollowLinks { get; init; }

    public int? MaxFrames { get; init; }

    public double ImageFps { get; init; } = 10;

    public bool Timings { get; init; }

    /// <summary>Camera file, when given: frames must have its size; the region and warp follow its horizon.</summary>
    public Core.Geometry.CameraModel? Camera { get; init; }

    public string? CameraPath { get; init; }
}
