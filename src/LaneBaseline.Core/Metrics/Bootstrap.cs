using LaneBaseline.Core.Random;

namespace LaneBaseline.Core.Metrics;

/// <summary>Per-frame statistics of one system that a bootstrap resample sums.</summary>
public sealed class BootstrapSeries
{
    /// <summary>TP at IoU 0.50 per frame.</summary>
    public List<int> TruePositives { get; } = [];

    /// <summary>Truth lanes per frame.</summary>
    public List<int> TruthLanes { get; } = [];

    /// <summary>Predicted lanes per frame.</summary>
    public List<int> PredLanes { get; } = [];

    /// <summary>Sum of assigned pair accuracies per frame.</summary>
    public List<double> PointAccuracySums { get; } = [];

    /// <summary>Adds one frame's statistics.</summary>
    public void Add(FrameScore frame, int halfIndex)
    {
        ArgumentNullException.ThrowIfNull(frame);
        TruePositives.Add(frame.TruePositives[halfIndex]);
        TruthLanes.Add(frame.TruthLanes);
        PredLanes.Add(frame.PredLanes);
        PointAccuracySums.Add(frame.PointAccuracySum);
    }
}

/// <summary>The four statistics the intervals are given for.</summary>
public enum BootstrapStatistic
{
    /// <summary>F1 at IoU 0.50.</summary>
    F1,

    /// <summary>Precision at IoU 0.50.</summary>
    Precision,

    /// <summary>Recall at IoU 0.50.</summary>
    Recall,

    /// <summary>Row-sampled point accuracy.</summary>
    Accuracy,
}

/// <summary>An interval [Low, High].</summary>
/// <param name="Low">Lower bound.</param>
/// <param name="High">Upper bound.</param>
public readonly record struct Interval(double Low, double High);

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
    /// <summary>Statistic values per resample: result[system][statistic][b].</summary>
    public static double[][][] Resample(IReadOnlyList<BootstrapSeries> systems, int resamples, ulong seed, int threads)
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

        Parallel.For(0, resamples, new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, threads) }, b =>
        {
            SplitMix64 rng = SplitMix64.ForStream(seed, (ulong)b);
            var tp = new long[systems.Count];
            var truth = new long[systems.Count];
            var pred = new long[systems.Count];
            var acc = new double[systems.Count];
            for (int i = 0; i < n; i++)
            {
                int f = rng.NextInt(n);
                for (int s = 0; s < systems.Count; s++)
                {
                    BootstrapSeries series = systems[s];
                    tp[s] += series.TruePositives[f];
                    truth[s] += series.TruthLanes[f];
                    pred[s] += series.PredLanes[f];
                    acc[s] += series.PointAccuracySums[f];
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
