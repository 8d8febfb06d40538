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

    /// <summary>
    /// TP at each threshold of <see cref="IouThreshold.MeanF1Set"/> per frame, frame after frame (empty unless the frames
    /// were added with the thresholds' indices; the per-tag intervals resample mF1 from them).
    /// </summary>
    public List<int> MeanF1TruePositives { get; } = [];

    /// <summary>Sequence (cluster) index per frame: clusters are numbered in order of first appearance.</summary>
    public List<int> Clusters { get; } = [];

    /// <summary>Number of distinct sequences (<see cref="Sharding.SequenceKey"/>) among the frames.</summary>
    public int ClusterCount => clusterIds.Count;

    private readonly Dictionary<string, int> clusterIds = new(StringComparer.Ordinal);

    /// <summary>Adds one frame's statistics.</summary>
    public void Add(FrameScore frame, int halfIndex)
    {
        ArgumentNullException.ThrowIfNull(frame);
        string sequence = Sharding.SequenceKey.Of(frame.Frame);
        if (!clusterIds.TryGetValue(sequence, out int cluster))
        {
            cluster = clusterIds.Count;
            clusterIds.Add(sequence, cluster);
        }

        Clusters.Add(cluster);
        TruePositives.Add(frame.IouF1.TruePositives[halfIndex]);
        TruthLanes.Add(frame.TruthLanes);
        PredLanes.Add(frame.PredLanes);
        PointAccuracySums.Add(frame.Points.AccuracySum);
    }

    /// <summary>Adds one frame's statistics and its TP at the mF1 thresholds (indices into <see cref="IouF1.FrameIouF1.TruePositives"/>).</summary>
    public void Add(FrameScore frame, int halfIndex, IReadOnlyList<int> meanF1Indices)
    {
        ArgumentNullException.ThrowIfNull(meanF1Indices);
        Add(frame, halfIndex);
        foreach (int k in meanF1Indices)
        {
            MeanF1TruePositives.Add(frame.IouF1.TruePositives[k]);
        }
    }
}
