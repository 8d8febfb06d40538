namespace LaneBaseline.Reporting.Audit;

/// <summary>One of the first findings of the file (the file is ranked worst frame first).</summary>
/// <param name="Rank">Frame rank (1 = worst).</param>
/// <param name="Frame">Frame key.</param>
/// <param name="Rule">Rule id.</param>
/// <param name="Severity">Severity name.</param>
/// <param name="Lane">Lane index, or null for the whole frame.</param>
/// <param name="Value">Measured value.</param>
/// <param name="Limit">The limit it broke.</param>
/// <param name="Unit">Unit of value and limit.</param>
/// <param name="Message">The finding's sentence.</param>
public sealed record AuditTopFinding(long Rank, string Frame, string Rule, string Severity, int? Lane, double Value, double Limit, string Unit, string Message);
