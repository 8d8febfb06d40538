namespace LaneBaseline.Core.Tuning;

/// <summary>One evaluated parameter set.</summary>
/// <param name="Index">Zero-based trial number (the order trials are proposed in).</param>
/// <param name="Phase"><c>explore</c> (quasi-random) or <c>refine</c> (local search around the best).</param>
/// <param name="Values">Parameter values, in the search space's order.</param>
/// <param name="Score">Objective value (higher is better).</param>
public sealed record Trial(int Index, string Phase, IReadOnlyList<double> Values, double Score);
