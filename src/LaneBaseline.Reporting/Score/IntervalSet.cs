namespace LaneBaseline.Reporting.Score;

/// <summary>The bootstrap intervals of one system.</summary>
/// <param name="Method">How they were computed, as written in the file.</param>
/// <param name="Level">Confidence level (0.95).</param>
/// <param name="Resamples">Bootstrap resamples.</param>
/// <param name="Seed">Seed of the resampling.</param>
/// <param name="ByStatistic">Interval per statistic key (<c>f1@0.50</c>, <c>precision@0.50</c>, <c>recall@0.50</c>, <c>accuracy</c>).</param>
public sealed record IntervalSet(string Method, double Level, long Resamples, ulong Seed, IReadOnlyDictionary<string, Ci> ByStatistic)
{
    /// <summary>The interval of a statistic, or null.</summary>
    public Ci? Get(string key) => ByStatistic.TryGetValue(key, out Ci ci) ? ci : null;
}
