using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.Coverage;

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

    /// <summary>What the bootstrap resamples; null picks sequences when the keys have them (<see cref="Bootstrap.DefaultUnit"/>).</summary>
    public BootstrapUnit? BootstrapUnit { get; init; }

    /// <summary>Quality gates (<c>--gate</c>), checked after every output is written.</summary>
    public IReadOnlyList<ScoreGate> Gates { get; init; } = [];

    /// <summary>Truth frames without a prediction record (<c>--missing</c>).</summary>
    public MissingFramePolicy Missing { get; init; } = MissingFramePolicy.Empty;

    /// <summary>Prediction records of frames the truth lacks (<c>--extra</c>).</summary>
    public ExtraFramePolicy Extra { get; init; } = ExtraFramePolicy.Ignore;

    /// <summary>Limits the page's tag galleries to this system (<c>--focus</c>), or null for every system.</summary>
    public string? Focus { get; init; }
}
