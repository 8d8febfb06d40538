namespace LaneBaseline.Core.Metrics;

/// <summary>The outcome of one gate.</summary>
/// <param name="Gate">The gate.</param>
/// <param name="Value">The value compared (the interval bound for a paired gate); NaN when it could not be computed.</param>
/// <param name="Passed">Whether the comparison holds.</param>
/// <param name="Explanation">One line: what was compared.</param>
public sealed record GateOutcome(ScoreGate Gate, double Value, bool Passed, string Explanation);
