using System.Globalization;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Audit;

/// <summary>What a partial audit state says about the shard and the job that wrote it.</summary>
public sealed record AuditStateHeader
{
    /// <summary>Format marker written as the first key.</summary>
    public const string FormatName = "lanebaseline-audit-state";

    /// <summary>The shard that wrote the state.</summary>
    public required ShardSpec Shard { get; init; }

    /// <summary>The job: inputs and every setting, equal for every shard of one job.</summary>
    public required AuditJob Job { get; init; }

    /// <summary>Records in the prediction input (every shard reads all of them).</summary>
    public required long InputFrames { get; init; }

    /// <summary>Frames this shard audited.</summary>
    public required long Frames { get; init; }

    /// <summary>Frames this shard compared with the baseline.</summary>
    public required long ComparedFrames { get; init; }

    /// <summary>Layout version of the state; 1 (until 2026-12-05) held the job as text and dropped settings in merge.</summary>
    public const int Version = 2;

    internal string JobKey() =>
        string.Join('\n', Job.Entries().Select(kv => kv.Key + "=" + kv.Value)) + "\n" + InputFrames.ToString(CultureInfo.InvariantCulture) + "\n" + Shard.Count.ToString(CultureInfo.InvariantCulture);
}
