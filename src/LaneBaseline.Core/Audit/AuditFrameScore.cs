namespace LaneBaseline.Core.Audit;

/// <summary>Per-frame outcome used for ranking, mining and overlays.</summary>
/// <param name="Frame">Frame key.</param>
/// <param name="Ordinal">Position in the prediction file.</param>
/// <param name="Score">Badness: 100 per error, 10 per warning, 1 per info, plus 10 x disagreement.</param>
/// <param name="Disagreement">1 - F1@0.50 against the baseline's confident lanes, or null when not compared.</param>
public sealed record AuditFrameScore(string Frame, long Ordinal, double Score, double? Disagreement);
