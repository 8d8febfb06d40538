namespace LaneBaseline.Reporting.Score;

/// <summary>Road-plane errors of a tally (score run with <c>--camera</c>), from the score file's <c>ground</c> object.</summary>
/// <param name="Lateral">Lateral error per look-ahead distance, nearest first.</param>
/// <param name="EgoWidthFrames">Frames with an ego-lane width on both sides.</param>
/// <param name="EgoWidthMeanM">Mean |ΔW| of the ego lane, metres (NaN without frames).</param>
/// <param name="CurvaturePairs">Pairs with a curvature on both sides.</param>
/// <param name="CurvatureMeanPerM">Mean |Δκ|, 1/m (NaN without pairs).</param>
public sealed record GroundSummary(IReadOnlyList<GroundLateral> Lateral, long EgoWidthFrames, double EgoWidthMeanM, long CurvaturePairs, double CurvatureMeanPerM);
