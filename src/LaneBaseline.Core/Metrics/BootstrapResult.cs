namespace LaneBaseline.Core.Metrics;

/// <summary>Bootstrap results for a run: per-system intervals and paired differences.</summary>
public sealed class BootstrapResult
{
    /// <summary>Resamples drawn.</summary>
    public int Resamples { get; init; }

    /// <summary>Seed of the resampling.</summary>
    public ulong Seed { get; init; }

    /// <summary>Confidence level (0.95).</summary>
    public double Level { get; init; } = 0.95;

    /// <summary>Intervals per system and statistic: [system][statistic].</summary>
    public required Interval[][] Intervals { get; init; }

    /// <summary>Resampled statistic values: [system][statistic][b].</summary>
    public required double[][][] Samples { get; init; }

    /// <summary>What one draw resamples.</summary>
    public BootstrapUnit Unit { get; init; } = BootstrapUnit.Frame;

    /// <summary>Number of units resampled (frames, or sequences for the cluster bootstrap).</summary>
    public int Units { get; init; }

    /// <summary>Number of sequences among the frames (whatever the unit).</summary>
    public int Clusters { get; init; }

    /// <summary>The unit as written in the JSON.</summary>
    public string UnitName => Unit == BootstrapUnit.Sequence ? "sequence" : "frame";

    /// <summary>Per-tag intervals (same seed, unit and resamples, each tag's frames resampled on their own), in ordinal tag order.</summary>
    public IReadOnlyDictionary<string, TagBootstrap> ByTag { get; init; } = new SortedDictionary<string, TagBootstrap>(StringComparer.Ordinal);
}
