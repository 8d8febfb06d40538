namespace LaneBaseline.Reporting.Score;

/// <summary>Mean lateral error at one look-ahead distance, over the true-positive pairs that reach it.</summary>
/// <param name="Key">Distance key as written in the score file (<c>"20"</c>).</param>
/// <param name="DistanceM">Distance ahead, metres.</param>
/// <param name="Pairs">Pairs measured at the distance.</param>
/// <param name="MeanM">Mean |ΔY|, metres (NaN without pairs).</param>
public sealed record GroundLateral(string Key, double DistanceM, long Pairs, double MeanM);
