namespace LaneBaseline.Reporting.Audit;

/// <summary>One row of the per-rule table: how often a rule fired and on how many frames.</summary>
/// <param name="Id">Rule id.</param>
/// <param name="Name">Rule name.</param>
/// <param name="Severity">Severity name (error, warning, info).</param>
/// <param name="Findings">Findings of the rule.</param>
/// <param name="Frames">Distinct frames with a finding of the rule.</param>
public sealed record AuditRuleCount(string Id, string Name, string Severity, long Findings, long Frames);
