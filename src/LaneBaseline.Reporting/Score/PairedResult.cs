namespace LaneBaseline.Reporting.Score;

/// <summary>The paired comparison of two systems on the same frames.</summary>
/// <param name="Key">Key as written (<c>"A - B"</c>).</param>
/// <param name="A">First system.</param>
/// <param name="B">Second system.</param>
/// <param name="Statistics">Statistics in file order.</param>
public sealed record PairedResult(string Key, string A, string B, IReadOnlyList<PairedStatistic> Statistics)
{
    /// <summary>Per-tag paired differences with their intervals (<c>paired.KEY.by_tag</c>), empty when the run had no bootstrap.</summary>
    public IReadOnlyDictionary<string, IReadOnlyList<PairedStatistic>> ByTag { get; init; } = new Dictionary<string, IReadOnlyList<PairedStatistic>>(StringComparer.Ordinal);
}
