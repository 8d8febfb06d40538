using LaneBaseline.Core.Metrics.Coverage;

namespace LaneBaseline.Core.Metrics;

/// <summary>What one system scored: overall, per tag, and the per-frame series for the bootstrap.</summary>
public sealed class SystemScore
{
    internal SystemScore(ScoredSystem system, IReadOnlyList<IouThreshold> thresholds)
    {
        System = system;
        Overall = new ScoreTally(thresholds);
    }

    /// <summary>The system.</summary>
    public ScoredSystem System { get; }

    /// <summary>All frames.</summary>
    public ScoreTally Overall { get; }

    /// <summary>Frames by truth tag, in ordinal key order.</summary>
    public SortedDictionary<string, ScoreTally> ByTag { get; } = new(StringComparer.Ordinal);

    /// <summary>Per-frame statistics in truth order.</summary>
    public BootstrapSeries Series { get; } = new();

    /// <summary>Per-frame statistics of each tag's frames in truth order (with the mF1 thresholds' TP), in ordinal tag order.</summary>
    public SortedDictionary<string, BootstrapSeries> TagSeries { get; } = new(StringComparer.Ordinal);

    /// <summary>How the prediction file covers the truth (whole files), or null when unknown (a merge of old states).</summary>
    public FrameCoverage? Coverage { get; set; }
}
