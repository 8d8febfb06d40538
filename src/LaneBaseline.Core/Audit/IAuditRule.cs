namespace LaneBaseline.Core.Audit;

/// <summary>
/// One audit rule: its catalogue entry and its check of one frame. Every rule is a class of its own in
/// <c>Audit/Rules/</c>, listed once in <see cref="AuditRuleCatalogue.Rules"/>; it is stateless, so one instance serves
/// every worker thread.
/// </summary>
public interface IAuditRule
{
    /// <summary>Stable id, name, severity, limit in words and its source.</summary>
    AuditRuleInfo Info { get; }

    /// <summary>What the rule needs, which decides when it runs (<see cref="AuditRuleFamily"/>).</summary>
    AuditRuleFamily Family { get; }

    /// <summary>Appends the frame's findings of this rule to <paramref name="sink"/>, in a fixed order.</summary>
    void Check(AuditFrame frame, List<AuditFinding> sink);
}
