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
    /// Statistic values per resample: result[system][statistic][b]. With <see cref="BootstrapUnit.Sequence"/>, each
    /// resample draws K of the K sequences with replacement and sums every frame of each drawn sequence (cluster
    /// bootstrap, Davison &amp; Hinkley 1997, Sec. 3.8, resampling stage one only); the systems share the draws, so
    /// paired differences use the same resampling. With one frame per sequence the draws, and so the results, equal
    /// the frame bootstrap's for the same seed.
    /// </summary>
    public static double[][][] Resample(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads, BootstrapUnit unit)
    {
        ArgumentNullException.ThrowIfNull(systems);
        int n = systems.Count == 0 ? 0 : systems[0].TruthLanes.Count;
        int stats = Enum.GetValues<BootstrapStatistic>().Length;
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

        // Units: per-unit sums of every statistic, in order of first appearance (frames: one unit per frame).
        int units = unit == BootstrapUnit.Sequence ? systems[0].ClusterCount : n;
        var tpU = new long[systems.Count][];
        var truthU = new long[systems.Count][];
        var predU = new long[systems.Count][];
        var accU = new double[systems.Count][];
        for (int s = 0; s < systems.Count; s++)
        {
            BootstrapSeries series = systems[s];
            tpU[s] = new long[units];
            truthU[s] = new long[units];
            predU[s] = new long[units];
            accU[s] = new double[units];
            for (int f = 0; f < n; f++)
            {
                int u = unit == BootstrapUnit.Sequence ? series.Clusters[f] : f;
                tpU[s][u] += series.TruePositives[f];
                truthU[s][u] += series.TruthLanes[f];
                predU[s][u] += series.PredLanes[f];
                accU[s][u] += series.PointAccuracySums[f];
            }
        }

        Parallel.For(0, resamples, new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, threads) }, b =>
        {
            SplitMix64 rng = SplitMix64.ForStream(seed, (ulong)b);
            var tp = new long[systems.Count];
            var truth = new long[systems.Count];
            var pred = new long[systems.Count];
            var acc = new double[systems.Count];
            for (int i = 0; i < units; i++)
            {
                int u = rng.NextInt(units);
                for (int s = 0; s < systems.Count; s++)
                {
                    tp[s] += tpU[s][u];
                    truth[s] += truthU[s][u];
                    pred[s] += predU[s][u];
                    acc[s] += accU[s][u];
                }
            }

            for (int s = 0; s < systems.Count; s++)
            {
                DetectionCounts c = DetectionCounts.From(tp[s], pred[s], truth[s]);
                result[s][(int)BootstrapStatistic.F1][b] = c.F1;
                result[s][(int)BootstrapStatistic.Precision][b] = c.Precision;
                result[s][(int)BootstrapStatistic.Recall][b] = c.Recall;
                result[s][(int)BootstrapStatistic.Accuracy][b] = truth[s] == 0 && pred[s] == 0 ? 1.0 : Metrics.Ratio(acc[s], truth[s]);
            }
        });
        return result;
    }

    /// <summary>Number of statistics <see cref="ResampleWithMeanF1"/> gives: the four of <see cref="BootstrapStatistic"/>, then mF1.</summary>
    public const int StatisticsWithMeanF1 = 5;

    /// <summary>Index of mF1 in the results of <see cref="ResampleWithMeanF1"/>.</summary>
    public const int MeanF1Index = 4;

    /// <summary>
    /// Like <see cref="Resample(IReadOnlyList{BootstrapSeries}, int, ulong, int, BootstrapUnit)"/> (same draws for the
    /// same seed, unit and number of units), with mF1 as a fifth statistic: result[system][statistic][b], statistic
    /// indices those of <see cref="BootstrapStatistic"/> then <see cref="MeanF1Index"/>. The series must carry
    /// <see cref="BootstrapSeries.MeanF1TruePositives"/>. Used for the per-tag intervals, each tag's frames forming
    /// their own series.
    /// </summary>
    public static double[][][] ResampleWithMeanF1(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads, BootstrapUnit unit)
    {
        ArgumentNullException.ThrowIfNull(systems);
        double[][][] result = new double[systems.Count][][];
        double[][][] basic = Resample(systems, resamples, seed, threads, unit);
        int n = systems.Count == 0 ? 0 : systems[0].TruthLanes.Count;
        int m = IouThreshold.MeanF1Set.Count;
        for (int s = 0; s < systems.Count; s++)
        {
            result[s] = [.. basic[s], new double[resamples]];
            if (n > 0 && systems[s].MeanF1TruePositives.Count != n * m)
            {
                throw new InvalidOperationException("the series carries no per-threshold TP for mF1");
            }
        }

        if (n == 0 || resamples == 0)
        {
            return result;
        }

        int units = unit == BootstrapUnit.Sequence ? systems[0].ClusterCount : n;
        var tpU = new long[systems.Count][];
        var truthU = new long[systems.Count][];
        var predU = new long[systems.Count][];
        for (int s = 0; s < systems.Count; s++)
        {
            BootstrapSeries series = systems[s];
            tpU[s] = new long[units * m];
            truthU[s] = new long[units];
            predU[s] = new long[units];
            for (int f = 0; f < n; f++)
            {
                int u = unit == BootstrapUnit.Sequence ? series.Clusters[f] : f;
                truthU[s][u] += series.TruthLanes[f];
                predU[s][u] += series.PredLanes[f];
                for (int k = 0; k < m; k++)
                {
                    tpU[s][(u * m) + k] += series.MeanF1TruePositives[(f * m) + k];
                }
            }
        }

        Parallel.For(0, resamples, new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, threads) }, b =>
        {
            // The same stream as Resample's draw b, so the resampled units are the same.
            SplitMix64 rng = SplitMix64.ForStream(seed, (ulong)b);
            var tp = new long[systems.Count * m];
            var truth = new long[systems.Count];
            var pred = new long[systems.Count];
            for (int i = 0; i < units; i++)
            {
                int u = rng.NextInt(units);
                for (int s = 0; s < systems.Count; s++)
                {
                    truth[s] += truthU[s][u];
                    pred[s] += predU[s][u];
                    for (int k = 0; k < m; k++)
                    {
                        tp[(s * m) + k] += tpU[s][(u * m) + k];
                    }
                }
            }

            for (int s = 0; s < systems.Count; s++)
            {
                double sum = 0;
                for (int k = 0; k < m; k++)
                {
                    sum += DetectionCounts.From(tp[(s * m) + k], pred[s], truth[s]).F1;
                }

                result[s][MeanF1Index][b] = sum / m;
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
