namespace LaneBaseline.Core.Metrics;

/// <summary>
/// One resample's sums of one system as one metric unit sees them: the shared truth and predicted lane counts and
/// the unit's own columns, numbered from 0 in the order its <see cref="IMetricUnit.AddBootstrapColumns"/> added them.
/// </summary>
public readonly struct BootstrapSums
{
    private readonly long[] counts;
    private readonly double[] sums;
    private readonly int countStart, sumStart;

    internal BootstrapSums(long[] counts, double[] sums, int countStart, int countColumns, int sumStart, int sumColumns)
    {
        this.counts = counts;
        this.sums = sums;
        this.countStart = countStart;
        this.sumStart = sumStart;
        CountColumns = countColumns;
        SumColumns = sumColumns;
    }

    /// <summary>Resampled truth lanes.</summary>
    public long TruthLanes => counts[0];

    /// <summary>Resampled predicted lanes.</summary>
    public long PredLanes => counts[1];

    /// <summary>Number of the unit's count columns.</summary>
    public int CountColumns { get; }

    /// <summary>Number of the unit's sum columns.</summary>
    public int SumColumns { get; }

    /// <summary>The unit's count column <paramref name="column"/>, resampled.</summary>
    public long Count(int column) => (uint)column < (uint)CountColumns ? counts[countStart + column] : throw new ArgumentOutOfRangeException(nameof(column));

    /// <summary>The unit's sum column <paramref name="column"/>, resampled.</summary>
    public double Sum(int column) => (uint)column < (uint)SumColumns ? sums[sumStart + column] : throw new ArgumentOutOfRangeException(nameof(column));
}
