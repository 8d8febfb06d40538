namespace LaneBaseline.Cli.Bench;

/// <summary>Order statistics of timing samples, shared by <c>bench</c> and <c>detect --timings</c>.</summary>
/// <remarks>
/// Median: the middle value of the sorted samples, the mean of the two middle values for an even count.
/// p95: nearest rank, the value at rank ceil(0.95 n) of the sorted samples (Hyndman and Fan 1996, definition 1).
/// </remarks>
internal readonly record struct TimingStats(int Count, double Median, double P95, double Mean, double Min, double Max)
{
    /// <summary>Statistics of <paramref name="samples"/> (not modified); all zero for an empty set.</summary>
    public static TimingStats From(IReadOnlyList<double> samples)
    {
        ArgumentNullException.ThrowIfNull(samples);
        int n = samples.Count;
        if (n == 0)
        {
            return default;
        }

        double[] v = [.. samples];
        Array.Sort(v);
        double median = n % 2 == 1 ? v[n / 2] : (v[(n / 2) - 1] + v[n / 2]) / 2;
        double p95 = v[Math.Clamp((int)Math.Ceiling(0.95 * n) - 1, 0, n - 1)];
        return new TimingStats(n, median, p95, v.Average(), v[0], v[^1]);
    }
}
