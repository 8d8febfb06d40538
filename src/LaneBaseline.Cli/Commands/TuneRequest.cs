namespace LaneBaseline.Cli.Commands;

/// <summary>Everything one tune run needs, parsed and checked.</summary>
internal sealed record TuneRequest
{
    public required string Frames { get; init; }

    public required string Truth { get; init; }

    public string? SpacePath { get; init; }

    public required string ConfigSource { get; init; }

    public int Budget { get; init; } = 40;

    public ulong Seed { get; init; } = 1;

    public string Objective { get; init; } = "f1";

    public double HoldoutFraction { get; init; } = 0.3;

    public string? HoldoutTruth { get; init; }

    public bool AllowOverlap { get; init; }

    public int Threads { get; init; } = 1;

    public bool Resume { get; init; }

    public required string Date { get; init; }

    public required string Output { get; init; }
}
