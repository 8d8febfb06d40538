namespace LaneBaseline.Core.Options;

/// <summary>
/// Per-lane confidence in [0, 1]: support · coverage · exp(−rms / residualScalePx), where support is the inlier
/// evidence over <see cref="FullSupportMass"/> (capped at 1) and coverage the share of inlier windows over
/// <see cref="FullCoverage"/> (capped at 1).
/// </summary>
public sealed record ConfidenceOptions
{
    /// <summary>Inlier evidence that counts as full support, in fully-set bird's-eye pixels (1–100000). Default 150.</summary>
    public double FullSupportMass { get; init; } = 150;

    /// <summary>Share of windows with evidence that counts as full coverage (0.05–1; a dashed line covers about a third). Default 0.35.</summary>
    public double FullCoverage { get; init; } = 0.35;

    /// <summary>Residual scale, in bird's-eye pixels (0.1–100). Default 3.</summary>
    public double ResidualScalePx { get; init; } = 3;

    /// <summary>Lanes scoring below this are not reported (0–1). Default 0.15.</summary>
    public double MinScore { get; init; } = 0.15;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "confidence.fullSupportMass", FullSupportMass, 1, 100000);
        OptionsChecks.Range(f, "confidence.fullCoverage", FullCoverage, 0.05, 1);
        OptionsChecks.Range(f, "confidence.residualScalePx", ResidualScalePx, 0.1, 100);
        OptionsChecks.Range(f, "confidence.minScore", MinScore, 0, 1);
    }
}
