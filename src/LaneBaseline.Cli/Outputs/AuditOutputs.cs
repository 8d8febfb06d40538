using LaneBaseline.Core.Audit;

namespace LaneBaseline.Cli.Outputs;

/// <summary>Where an audit's outputs go and which gate applies.</summary>
/// <param name="OutPath">Findings file.</param>
/// <param name="FramesRoot">Frames root for overlays, or null.</param>
/// <param name="Overlays">Worst frames to draw.</param>
/// <param name="Mine">Frames to list for labelling.</param>
/// <param name="Gate">Severity that fails the run, or null.</param>
/// <param name="Report">HTML page and its printed time, or null.</param>
internal sealed record AuditOutputs(string OutPath, string? FramesRoot, int Overlays, int Mine, AuditSeverity? Gate, (string Path, DateTimeOffset At)? Report)
{
    /// <summary>Per-rule summary JSON (<c>--summary-json</c>), or null.</summary>
    public string? SummaryJson { get; init; }
}
