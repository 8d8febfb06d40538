namespace LaneBaseline.Vision.Synthetic;

/// <summary>Settings of one render run (see the <c>render</c> command).</summary>
public sealed record RenderJobOptions
{
    /// <summary>Output folder; frames go below it, with <c>truth.lanes.jsonl</c> and <c>camera.json</c>.</summary>
    public required string OutDir { get; init; }

    /// <summary>Seed of everything random.</summary>
    public ulong Seed { get; init; } = 1;

    /// <summary>Number of scenes (each a still, or a sequence of <see cref="SequenceLength"/> frames).</summary>
    public int Count { get; init; } = 10;

    /// <summary>Frames per scene (1 = stills).</summary>
    public int SequenceLength { get; init; } = 1;

    /// <summary>Frame rate of sequences, frames per second.</summary>
    public double FramesPerSecond { get; init; } = 10;

    /// <summary>The camera (its image size is the frame size).</summary>
    public required CameraModel Camera { get; init; }

    /// <summary>Conditions applied to every scene, or null for the default mix (clean and each condition in turn).</summary>
    public IReadOnlyList<string>? Conditions { get; init; }

    /// <summary>Severity for every condition, or null for a seeded random severity per scene.</summary>
    public double? Severity { get; init; }

    /// <summary>When set, renders every scene at severities 0, 0.25, 0.5, 0.75 and 1 of this condition.</summary>
    public string? Sweep { get; init; }

    /// <summary>"jpg" or "png".</summary>
    public string Format { get; init; } = "jpg";

    /// <summary>JPEG quality 1–100.</summary>
    public int JpegQuality { get; init; } = 92;

    /// <summary>Worker threads (the output does not depend on it).</summary>
    public int Threads { get; init; } = 1;

    /// <summary>When set, also writes PNG frames with the truth drawn over them to this folder.</summary>
    public string? OverlayDir { get; init; }

    /// <summary>Severities of a sweep.</summary>
    public static IReadOnlyList<double> SweepSeverities { get; } = [0, 0.25, 0.5, 0.75, 1];
}
