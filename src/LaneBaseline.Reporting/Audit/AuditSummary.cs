namespace LaneBaseline.Reporting.Audit;

/// <summary>What the report shows of an audit: counts per rule and the first findings.</summary>
/// <param name="Source">The findings file as the user named it.</param>
/// <param name="Findings">Number of findings (lines).</param>
/// <param name="FlaggedFrames">Distinct frames with at least one finding.</param>
/// <param name="Rules">Every catalogue rule in catalogue order, then rules unknown to this version in id order.</param>
/// <param name="Top">The first findings of the file, in file (rank) order.</param>
public sealed record AuditSummary(string Source, long Findings, long FlaggedFrames, IReadOnlyList<AuditRuleCount> Rules, IReadOnlyList<AuditTopFinding> Top)
{
    /// <summary>Thumbnails of the overlays <c>audit --overlay-count</c> drew, worst frame first (empty when none).</summary>
    public IReadOnlyList<AuditThumbnail> Thumbnails { get; init; } = [];
}
