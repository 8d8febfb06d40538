namespace LaneBaseline.Reporting.Score;

/// <summary>A paired difference statistic(a) − statistic(b).</summary>
/// <param name="Key">Statistic key.</param>
/// <param name="Diff">Full-sample difference.</param>
/// <param name="Ci95">Joint-bootstrap interval of the difference, or null.</param>
public sealed record PairedStatistic(string Key, double Diff, Ci? Ci95);
