namespace LaneBaseline.Core.Audit;

/// <summary>One finding of one rule on one frame (and lane).</summary>
/// <param name="Frame">Frame key.</param>
/// <param name="Ordinal">Zero-based position of the frame in the prediction file.</param>
/// <param name="Rule">Stable rule id (e.g. <c>LBA-I01</c>).</param>
/// <param name="Severity">Severity.</param>
/// <param name="Lane">Zero-based lane index in the frame's record, or null when the finding concerns the frame.</param>
/// <param name="OtherLane">The second lane of a pair rule, or null.</param>
/// <param name="Value">The measured value.</param>
/// <param name="Limit">The limit it broke.</param>
/// <param name="Unit">Unit of value and limit.</param>
/// <param name="Message">One plain sentence.</param>
public sealed record AuditFinding(
    string Frame,
    long Ordinal,
    string Rule,
    AuditSeverity Severity,
    int? Lane,
    int? OtherLane,
    double Value,
    double Limit,
    string Unit,
    string Message);
