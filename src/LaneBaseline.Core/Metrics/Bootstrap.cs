using LaneBaseline.Core.Random;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Percentile bootstrap over frames (Efron 1979): frames are resampled with replacement, the same resampled frames
/// for every system, so differences between systems get paired intervals. Resample b draws its frames from
/// <c>SplitMix64.ForStream(seed, b)</c>, so results do not depend on the thread count.
/// </summary>
/// <remarks>
/// Interval bounds are the 2.5th and 97.5th percentiles of the resampled statistic with linear interpolation
/// between order statistics (position q·(B−1)).
/// <para>References: [1] B. Efron, "Bootstrap methods: another look at the jackknife", Annals of Statistics 7(1), 1979,
/// DOI 10.1214/aos/1176344552.</para>
/// </remarks>
public static class Bootstrap
{
    /// <summary>
    /// The unit <c>--bootstrap-unit</c> leaves to the data: whole sequences when the frames form at least two
    /// sequences and some sequence holds more than one frame, else single frames.
    /// </summary>
    public static BootstrapUnit DefaultUnit(BootstrapSeries series)
    {
        ArgumentNullException.ThrowIfNull(series);
        int n = series.Clusters.Count, k = series.ClusterCount;
        return k >= 2 && k < n ? BootstrapUnit.Sequence : BootstrapUnit.Frame;
    }

    /// <summary>Statistic values per resample, resampling single frames: result[system][statistic][b].</summary>
    public static double[][][] Resample(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads) =>
        Resample(systems, resamples, seed, threads, BootstrapUnit.Frame);

    /// <summary>
    /// Statistic values per resample: result[system][statistic][b], statistics those of <see cref="BootstrapStatistic"/>.
    /// With <see cref="BootstrapUnit.Sequence"/>, each resample draws K of the K sequences with replacement and sums
    /// every frame of each drawn sequence (cluster bootstrap, Davison &amp; Hinkley 1997, Sec. 3.8, resampling stage one
    /// only); the systems share the draws, so paired differences use the same resampling. With one frame per sequence
    /// the draws, and so the results, equal the frame bootstrap's for the same seed.
    /// </summary>
    public static double[][][] Resample(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads, BootstrapUnit unit) =>
        Run(systems, resamples, seed, threads, unit, Enum.GetValues<BootstrapStatistic>().Length);

    /// <summary>Number of statistics <see cref="ResampleWithMeanF1"/> gives: the four of <see cref="BootstrapStatistic"/>, then mF1.</summary>
    public const int StatisticsWithMeanF1 = 5;

    /// <summary>Index of mF1 in the results of <see cref="ResampleWithMeanF1"/>.</summary>
    public const int MeanF1Index = 4;

    /// <summary>
    /// Like <see cref="Resample(IReadOnlyList{BootstrapSeries}, int, ulong, int, BootstrapUnit)"/> (same draws for the
    /// same seed, unit and number of units), with mF1 as a fifth statistic: result[system][statistic][b], statistic
    /// indices those of <see cref="BootstrapStatistic"/> then <see cref="MeanF1Index"/>. The series must carry
    /// <see cref="BootstrapSeries.HasMeanF1"/>. Used for the per-tag intervals, each tag's frames forming their own series.
    /// </summary>
    public static double[][][] ResampleWithMeanF1(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads, BootstrapUnit unit)
    {
        ArgumentNullException.ThrowIfNull(systems);
        foreach (BootstrapSeries series in systems)
        {
            if (series.Clusters.Count > 0 && !series.HasMeanF1)
            {
                throw new InvalidOperationException("the series carries no per-threshold TP for mF1");
            }
        }

        return Run(systems, resamples, seed, threads, unit, StatisticsWithMeanF1);
    }

    /// <summary>
    /// The resampling engine: sums every column of every series per unit (frame or sequence, in frame order), then per
    /// resample b draws the units from <c>SplitMix64.ForStream(seed, b)</c>, sums the drawn units' columns in draw
    /// order and lets each metric unit compute its statistics from its sums
    /// (<see cref="IMetricUnit.BootstrapStatistics"/>).
    /// </summary>
    private static double[][][] Run(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads, BootstrapUnit unit, int stats)
    {
        ArgumentNullException.ThrowIfNull(systems);
        int n = systems.Count == 0 ? 0 : systems[0].Clusters.Count;
        var result = new double[systems.Count][][];
        for (int s = 0; s < systems.Count; s++)
        {
            result[s] = new double[stats][];
            for (int k = 0; k < stats; k++)
            {
                result[s][k] = new double[resamples];
            }
        }

        if (n == 0 || resamples == 0)
        {
            return result;
        }

        // Units: per-unit sums of every column, in order of first appearance (frames: one unit per frame).
        int units = unit == BootstrapUnit.Sequence ? systems[0].ClusterCount : n;
        var countsU = new long[systems.Count][];
        var sumsU = new double[systems.Count][];
        for (int s = 0; s < systems.Count; s++)
        {
            BootstrapSeries series = systems[s];
            int wc = series.CountWidth, ws = series.SumWidth;
            countsU[s] = new long[units * wc];
            sumsU[s] = new double[units * ws];
            for (int f = 0; f < n; f++)
            {
                int u = unit == BootstrapUnit.Sequence ? series.Clusters[f] : f;
                for (int c = 0; c < wc; c++)
                {
                    countsU[s][(u * wc) + c] += series.Counts[(f * wc) + c];
                }

                for (int c = 0; c < ws; c++)
                {
                    sumsU[s][(u * ws) + c] += series.Sums[(f * ws) + c];
                }
            }
        }

        IReadOnlyList<IMetricUnit> metrics = MetricCatalogue.Units;
        Parallel.For(0, resamples, new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, threads) }, b =>
        {
            SplitMix64 rng = SplitMix64.ForStream(seed, (ulong)b);
            var counts = new long[systems.Count][];
            var sums = new double[systems.Count][];
            for (int s = 0; s < systems.Count; s++)
            {
                counts[s] = new long[systems[s].CountWidth];
                sums[s] = new double[systems[s].SumWidth];
            }

            for (int i = 0; i < units; i++)
            {
                int u = rng.NextInt(units);
                for (int s = 0; s < systems.Count; s++)
                {
                    long[] cs = counts[s], cu = countsU[s];
                    double[] ss = sums[s], su = sumsU[s];
                    int wc = cs.Length, ws = ss.Length;
                    for (int c = 0; c < wc; c++)
                    {
                        cs[c] += cu[(u * wc) + c];
                    }

                    for (int c = 0; c < ws; c++)
                    {
                        ss[c] += su[(u * ws) + c];
                    }
                }
            }

            Span<double> values = stackalloc double[stats];
            for (int s = 0; s < systems.Count; s++)
            {
                values.Fill(double.NaN);
                for (int m = 0; m < metrics.Count; m++)
                {
                    metrics[m].BootstrapStatistics(systems[s].View(counts[s], sums[s], m), values);
                }

                for (int k = 0; k < stats; k++)
                {
                    result[s][k][b] = values[k];
                }
            }
        });
        return result;
    }

    /// <summary>Central interval at <paramref name="level"/> (e.g. 0.95) by linear-interpolated percentiles.</summary>
    public static Interval Percentiles(ReadOnlySpan<double> values, double level)
    {
        if (values.IsEmpty)
        {
            return new Interval(double.NaN, double.NaN);
        }

        double[] sorted = values.ToArray();
        Array.Sort(sorted);
        double alpha = (1 - level) / 2;
        return new Interval(Quantile(sorted, alpha), Quantile(sorted, 1 - alpha));
    }

    /// <summary>Quantile of sorted values with linear interpolation at position q·(n−1).</summary>
    public static double Quantile(IReadOnlyList<double> sorted, double q)
    {
        ArgumentNullException.ThrowIfNull(sorted);
        double h = q * (sorted.Count - 1);
        int lo = (int)Math.Floor(h);
        int hi = Math.Min(lo + 1, sorted.Count - 1);
        return sorted[lo] + ((h - lo) * (sorted[hi] - sorted[lo]));
    }
}
