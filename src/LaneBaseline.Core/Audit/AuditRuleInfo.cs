namespace LaneBaseline.Core.Audit;

/// <summary>A rule's catalogue entry: stable id, short name, severity, limit and where the limit comes from.</summary>
/// <param name="Id">Stable id; never reused for another meaning.</param>
/// <param name="Name">Short kebab-case name.</param>
/// <param name="Severity">Severity of its findings.</param>
/// <param name="Limit">The limit in words, with its default.</param>
/// <param name="Source">Where the limit comes from (rows of docs/checks.md, or "common practice").</param>
public sealed record AuditRuleInfo(string Id, string Name, AuditSeverity Severity, string Limit, string Source);
