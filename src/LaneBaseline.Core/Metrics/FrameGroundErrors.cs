namespace LaneBaseline.Core.Metrics;

/// <summary>One frame's metric-space error sums.</summary>
/// <param name="LateralAbsSumM">Σ |ΔY| per look-ahead distance, metres.</param>
/// <param name="LateralCount">Pairs with a value per look-ahead distance.</param>
/// <param name="EgoWidthAbsErrorM">|ΔW| of the ego lane at 10 m, or NaN.</param>
/// <param name="CurvatureAbsSum">Σ |Δκ| over pairs, 1/m.</param>
/// <param name="CurvatureCount">Pairs with a curvature on both sides.</param>
public sealed record FrameGroundErrors(double[] LateralAbsSumM, int[] LateralCount, double EgoWidthAbsErrorM, double CurvatureAbsSum, int CurvatureCount);
