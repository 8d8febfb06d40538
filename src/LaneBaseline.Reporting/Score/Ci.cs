namespace LaneBaseline.Reporting.Score;

/// <summary>A confidence interval.</summary>
/// <param name="Low">Lower bound.</param>
/// <param name="High">Upper bound.</param>
public readonly record struct Ci(double Low, double High);
