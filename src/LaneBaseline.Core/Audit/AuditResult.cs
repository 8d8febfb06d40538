namespace LaneBaseline.Core.Audit;

/// <summary>What an audit found.</summary>
public sealed class AuditResult
{
    /// <summary>Frames audited.</summary>
    public long Frames { get; internal set; }

    /// <summary>Records in the prediction input, including those of other shards.</summary>
    public long InputFrames { get; internal set; }

    /// <summary>Frames compared with the baseline.</summary>
    public long ComparedFrames { get; internal set; }

    /// <summary>Findings, ranked: worst frame first, then frame order, severity, rule and lane.</summary>
    public IReadOnlyList<AuditFinding> Findings { get; internal set; } = [];

    /// <summary>Frame rank (1 = worst) of each finding, parallel to <see cref="Findings"/>.</summary>
    public IReadOnlyList<int> Ranks { get; internal set; } = [];

    /// <summary>Frames with findings or a baseline comparison, worst first.</summary>
    public IReadOnlyList<AuditFrameScore> RankedFrames { get; internal set; } = [];

    /// <summary>The frames most worth labelling: by disagreement with the baseline when compared, else by badness.</summary>
    public IEnumerable<AuditFrameScore> Mine(int count) =>
        (ComparedFrames > 0
            ? RankedFrames.Where(f => f.Disagreement is not null).OrderByDescending(f => f.Disagreement!.Value).ThenBy(f => f.Ordinal)
            : RankedFrames.Where(f => f.Score > 0).OrderByDescending(f => f.Score).ThenBy(f => f.Ordinal)).Take(count);
}
