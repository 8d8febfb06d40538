using System.Globalization;

namespace LaneBaseline.Core.Sharding;

/// <summary>The checks every merge of partial states makes before combining them.</summary>
public static class ShardCoverage
{
    /// <summary>
    /// Checks that the states belong to one job (equal job keys, which include the shard count) and that every shard
    /// 0..N−1 is present exactly once.
    /// </summary>
    /// <param name="paths">State files, parallel to <paramref name="states"/>.</param>
    /// <param name="states">Each state's shard and job key.</param>
    /// <param name="kind">Words for messages: "" for score states, "audit " for audit states.</param>
    /// <param name="jobParts">What the job key covers, for the message (e.g. "truth, systems, settings or shard count").</param>
    /// <exception cref="BadInputException">Another job, a repeated shard or a missing one.</exception>
    public static void Check(IReadOnlyList<string> paths, IReadOnlyList<(ShardSpec Shard, string JobKey)> states, string kind, string jobParts)
    {
        ArgumentNullException.ThrowIfNull(paths);
        ArgumentNullException.ThrowIfNull(states);
        var seen = new HashSet<int>();
        for (int i = 0; i < states.Count; i++)
        {
            if (states[i].JobKey != states[0].JobKey)
            {
                throw BadInputException.At(paths[i], 1, null, $"belongs to a different {kind}job than {paths[0]} ({jobParts} differ)");
            }

            if (!seen.Add(states[i].Shard.Index))
            {
                throw BadInputException.At(paths[i], 1, "shard_index", $"shard {states[i].Shard} is given twice");
            }
        }

        int count = states[0].Shard.Count;
        if (seen.Count != count)
        {
            var missing = Enumerable.Range(0, count).Where(k => !seen.Contains(k)).Select(k => k.ToString(CultureInfo.InvariantCulture));
            throw new BadInputException($"merge: {kind}shards {string.Join(", ", missing)} of {count} are missing ({BadInputException.Files(paths)})");
        }
    }
}
