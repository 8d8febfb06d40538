using System.Globalization;
using LaneBaseline.Core.Metrics.Coverage;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Metrics;

/// <summary>The run parameters a partial score state carries, which every shard of one job must share.</summary>
public sealed record ScoreStateHeader
{
    /// <summary>Format marker written in the header (after <c>tool</c>).</summary>
    public const string FormatName = "lanebaseline-score-state";

    /// <summary>
    /// The header's <c>schema_version</c> (docs/schema/score-state.schema.json). States written before 2026-12-05 name
    /// it <c>version</c> and have no <c>tool</c>; <c>merge</c> still reads them.
    /// </summary>
    public const int SchemaVersion = 1;

    /// <summary>The shard that wrote the state.</summary>
    [NotInJobKey("the index differs between shards; JobKey adds the count")]
    public required ShardSpec Shard { get; init; }

    /// <summary>Truth path as given to score.</summary>
    public required string Truth { get; init; }

    /// <summary>Records in the truth file.</summary>
    public required int TruthFrames { get; init; }

    /// <summary>Systems scored, in order.</summary>
    public required IReadOnlyList<ScoredSystem> Systems { get; init; }

    /// <summary>Scoring settings.</summary>
    public required ScoreSettings Settings { get; init; }

    /// <summary>Bootstrap resamples the merged result uses.</summary>
    public required int Resamples { get; init; }

    /// <summary>Bootstrap seed the merged result uses.</summary>
    public required ulong Seed { get; init; }

    /// <summary>Whether the state also carries mask IoU (truth and every prediction are mask folders).</summary>
    public bool MaskIou { get; init; }

    /// <summary>
    /// Content hashes (<see cref="IO.ContentHash"/>) of the truth and each system's predictions, in that order; empty in
    /// states written before they were recorded. <c>merge</c> refuses states whose inputs had different contents.
    /// </summary>
    [NotInJobKey("compared on its own, naming the input whose contents differ")]
    public IReadOnlyList<string> InputHashes { get; init; } = [];

    /// <summary>The bootstrap unit asked for (<c>--bootstrap-unit</c>), or null for the default.</summary>
    public BootstrapUnit? Unit { get; init; }

    /// <summary>Coverage of each system's prediction file (whole files, so equal in every shard), or null (older states).</summary>
    [NotInJobKey("derived from the inputs, which the input hashes already compare")]
    public IReadOnlyList<FrameCoverage>? Coverage { get; init; }

    /// <summary>
    /// Everything but the shard index, the input hashes and the coverage (equal for every shard of one job): the shard
    /// count and every other property of the header and of its <see cref="ScoreSettings"/>, walked by
    /// <see cref="ShardJobKey"/>, so a new setting cannot be left out.
    /// </summary>
    public string JobKey() => "shard_count=" + Shard.Count.ToString(CultureInfo.InvariantCulture) + "\n" + ShardJobKey.Of(this);
}
