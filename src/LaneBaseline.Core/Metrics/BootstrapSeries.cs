namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Per-frame additive columns of one system that a bootstrap resample sums (<see cref="Bootstrap"/>): the shared
/// truth and predicted lane counts, then each metric unit's own columns (<see cref="IMetricUnit.AddBootstrapColumns"/>),
/// whole-number counts and floating-point sums apart, in catalogue order.
/// </summary>
public sealed class BootstrapSeries
{
    /// <summary>Truth lanes per frame (shared count column 0, read by every unit through <see cref="BootstrapSums.TruthLanes"/>).</summary>
    public List<int> TruthLanes { get; } = [];

    /// <summary>Predicted lanes per frame (shared count column 1, <see cref="BootstrapSums.PredLanes"/>).</summary>
    public List<int> PredLanes { get; } = [];

    /// <summary>Sequence (cluster) index per frame: clusters are numbered in order of first appearance.</summary>
    public List<int> Clusters { get; } = [];

    /// <summary>Number of distinct sequences (<see cref="Sharding.SequenceKey"/>) among the frames.</summary>
    public int ClusterCount => clusterIds.Count;

    /// <summary>Whether the frames were added with the mF1 thresholds' indices (the per-tag series), so the IoU F1 unit carries their TP.</summary>
    public bool HasMeanF1 { get; private set; }

    /// <summary>Count columns per frame: the two shared ones, then every unit's.</summary>
    internal int CountWidth => countStarts[^1];

    /// <summary>Sum columns per frame, every unit's.</summary>
    internal int SumWidth => sumStarts[^1];

    /// <summary>Count columns, frame after frame (<see cref="CountWidth"/> per frame).</summary>
    internal List<long> Counts { get; } = [];

    /// <summary>Sum columns, frame after frame (<see cref="SumWidth"/> per frame).</summary>
    internal List<double> Sums { get; } = [];

    private readonly Dictionary<string, int> clusterIds = new(StringComparer.Ordinal);

    // First count / sum column of each unit of MetricCatalogue.Units, then the width; fixed by the first frame.
    private readonly int[] countStarts = new int[MetricCatalogue.Units.Count + 1];
    private readonly int[] sumStarts = new int[MetricCatalogue.Units.Count + 1];

    /// <summary>Adds one frame's columns (no mF1 columns).</summary>
    public void Add(FrameScore frame, int halfIndex) => Add(frame, halfIndex, null);

    /// <summary>
    /// Adds one frame's columns; with <paramref name="meanF1Indices"/> (indices into
    /// <see cref="IouF1.FrameIouF1.TruePositives"/> of <see cref="IouThreshold.MeanF1Set"/>) the IoU F1 unit adds
    /// its TP at those thresholds too (the per-tag intervals resample mF1 from them).
    /// </summary>
    public void Add(FrameScore frame, int halfIndex, IReadOnlyList<int>? meanF1Indices)
    {
        ArgumentNullException.ThrowIfNull(frame);
        bool first = Clusters.Count == 0;
        if (first)
        {
            HasMeanF1 = meanF1Indices is not null;
        }
        else if (HasMeanF1 != meanF1Indices is not null)
        {
            throw new InvalidOperationException("every frame of a bootstrap series must be added with, or every one without, the mF1 thresholds");
        }

        string sequence = Sharding.SequenceKey.Of(frame.Frame);
        if (!clusterIds.TryGetValue(sequence, out int cluster))
        {
            cluster = clusterIds.Count;
            clusterIds.Add(sequence, cluster);
        }

        Clusters.Add(cluster);
        TruthLanes.Add(frame.TruthLanes);
        PredLanes.Add(frame.PredLanes);
        int countsBefore = Counts.Count, sumsBefore = Sums.Count;
        Counts.Add(frame.TruthLanes);
        Counts.Add(frame.PredLanes);
        IReadOnlyList<IMetricUnit> units = MetricCatalogue.Units;
        for (int i = 0; i < units.Count; i++)
        {
            int c = Counts.Count - countsBefore, m = Sums.Count - sumsBefore;
            if (first)
            {
                countStarts[i] = c;
                sumStarts[i] = m;
            }
            else if (countStarts[i] != c || sumStarts[i] != m)
            {
                throw new InvalidOperationException($"metric unit {units[i].Name} added a different number of bootstrap columns for frame {frame.Frame}");
            }

            units[i].AddBootstrapColumns(this, frame, halfIndex, meanF1Indices);
        }

        int width = Counts.Count - countsBefore, sumWidth = Sums.Count - sumsBefore;
        if (first)
        {
            countStarts[^1] = width;
            sumStarts[^1] = sumWidth;
        }
        else if (countStarts[^1] != width || sumStarts[^1] != sumWidth)
        {
            throw new InvalidOperationException($"metric unit {units[^1].Name} added a different number of bootstrap columns for frame {frame.Frame}");
        }
    }

    /// <summary>Adds a whole-number column of the current frame (for a unit's <see cref="IMetricUnit.AddBootstrapColumns"/>).</summary>
    public void AddCount(long value) => Counts.Add(value);

    /// <summary>Adds a floating-point sum column of the current frame (for a unit's <see cref="IMetricUnit.AddBootstrapColumns"/>).</summary>
    public void AddSum(double value) => Sums.Add(value);

    /// <summary>The resampled sums of unit <paramref name="unit"/> (index in <see cref="MetricCatalogue.Units"/>).</summary>
    internal BootstrapSums View(long[] counts, double[] sums, int unit) =>
        new(counts, sums, countStarts[unit], countStarts[unit + 1] - countStarts[unit], sumStarts[unit], sumStarts[unit + 1] - sumStarts[unit]);
}
