using LaneBaseline.Core.Sharding;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary><c>LBA-T03</c> frame gap: frame numbers are missing before this frame in its sequence (<see cref="SequenceKey"/>).</summary>
public sealed class FrameGapRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.FrameGap, "frame-gap", AuditSeverity.Warning, "a numbered sequence skips frame numbers",
        "common practice: a detector must write one record per frame (docs/cli.md, docs/lane-file.md)");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Temporal;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        if (frame.Previous is null || frame.Step <= 1)
        {
            return;
        }

        string sequence = SequenceKey.Parse(frame.Record.Frame)!.Value.Name;
        sink.Add(frame.Finding(this, null, null, frame.Step - 1, 0, "frames", Inv($"{frame.Step - 1} frame(s) missing before this one in sequence '{sequence}'")));
    }
}
