namespace LaneBaseline.Core.Metrics;

/// <summary>An interval [Low, High].</summary>
/// <param name="Low">Lower bound.</param>
/// <param name="High">Upper bound.</param>
public readonly record struct Interval(double Low, double High);
