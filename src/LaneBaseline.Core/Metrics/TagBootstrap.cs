namespace LaneBaseline.Core.Metrics;

/// <summary>The bootstrap of one tag's frames.</summary>
public sealed class TagBootstrap
{
    /// <summary>Units resampled (the tag's frames, or its sequences).</summary>
    public int Units { get; init; }

    /// <summary>Resampled values: [system][statistic][b], statistics as in <see cref="Bootstrap.ResampleWithMeanF1"/>.</summary>
    public required double[][][] Samples { get; init; }

    /// <summary>Intervals: [system][statistic].</summary>
    public required Interval[][] Intervals { get; init; }

    /// <summary>
    /// Computes the per-tag bootstraps of every tag of the first system (all systems share the truth's tags). Tags
    /// whose frames form fewer than two sequences under the sequence unit are named in one line: a <c>warning:</c>
    /// when the unit was asked for (<paramref name="unitAsked"/>), as for the overall interval, else a <c>note:</c>.
    /// </summary>
    public static SortedDictionary<string, TagBootstrap> Compute(IReadOnlyList<SystemScore> results, int resamples, ulong seed, int threads, BootstrapUnit unit, double level, Action<string>? warn, bool unitAsked = true)
    {
        ArgumentNullException.ThrowIfNull(results);
        var byTag = new SortedDictionary<string, TagBootstrap>(StringComparer.Ordinal);
        if (results.Count == 0)
        {
            return byTag;
        }

        var collapsed = new List<string>();
        foreach (KeyValuePair<string, BootstrapSeries> kv in results[0].TagSeries)
        {
            BootstrapSeries[] series = [.. results.Select(r => r.TagSeries[kv.Key])];
            int clusters = kv.Value.ClusterCount;
            if (unit == BootstrapUnit.Sequence && clusters < 2)
            {
                collapsed.Add(kv.Key);
            }

            double[][][] samples = Bootstrap.ResampleWithMeanF1(series, resamples, seed, threads, unit);
            byTag.Add(kv.Key, new TagBootstrap
            {
                Units = unit == BootstrapUnit.Sequence ? clusters : kv.Value.Clusters.Count,
                Samples = samples,
                Intervals = [.. samples.Select(sys => sys.Select(stat => Bootstrap.Percentiles(stat, level)).ToArray())],
            });
        }

        if (collapsed.Count > 0)
        {
            // One line, as the overall warning: the tags whose frames form fewer than two sequences.
            warn?.Invoke(string.Create(System.Globalization.CultureInfo.InvariantCulture, $"{(unitAsked ? "warning" : "note")}: --bootstrap-unit sequence: {collapsed.Count} tag(s) cover fewer than 2 sequences, so their intervals collapse to a point: {string.Join(", ", collapsed.Take(5).Select(t => "'" + t + "'"))}{(collapsed.Count > 5 ? ", …" : string.Empty)} (use --bootstrap-unit frame)"));
        }

        return byTag;
    }

    /// <summary>The interval of statistic(a) − statistic(b) over the joint resamples of the tag.</summary>
    public Interval Paired(int a, int b, int stat, double level)
    {
        double[] sa = Samples[a][stat], sb = Samples[b][stat];
        var diff = new double[sa.Length];
        for (int i = 0; i < diff.Length; i++)
        {
            diff[i] = sa[i] - sb[i];
        }

        return Bootstrap.Percentiles(diff, level);
    }

    /// <summary>JSON key of statistic index <paramref name="stat"/> (the four overall keys, then <c>mf1</c>).</summary>
    public static string Key(int stat) => stat == Bootstrap.MeanF1Index ? "mf1" : ScoreJsonWriter.StatisticKey((BootstrapStatistic)stat);

    /// <summary>Full-sample value of statistic index <paramref name="stat"/> on a tally.</summary>
    public static double Value(ScoreTally tally, int stat)
    {
        ArgumentNullException.ThrowIfNull(tally);
        return stat == Bootstrap.MeanF1Index ? tally.IouF1.MeanF1 : ScoreJsonWriter.Statistic(tally, (BootstrapStatistic)stat);
    }
}
