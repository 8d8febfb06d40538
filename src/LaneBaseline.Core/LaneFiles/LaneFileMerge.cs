using System.Globalization;
using System.Text;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// Merges lane files written by sharded runs into the file one unsharded run writes: records are copied verbatim
/// (byte for byte) in ascending ordinal order of their frame keys, the order in which <c>detect</c> visits a folder.
/// Each input must already be in that order; a frame present in two inputs is an error, and so are records of
/// different detect configurations (their <c>config</c> hashes differ: shards run with different presets).
/// Records of <c>detect --shard K/N</c> end with <c>"shard":"K/N"</c> (an extra key, which the lane-file format
/// permits); when the inputs carry it, every shard 0..N−1 must be given exactly once, each record must belong to the
/// shard it names, and the key is dropped from the merged records, so the result equals one unsharded run.
/// An input without records (a shard that received no frame) counts as one of the shards it cannot name.
/// </summary>
public static class LaneFileMerge
{
    /// <summary>Merges <paramref name="inputs"/> into <paramref name="output"/>; returns the number of records.</summary>
    public static long Merge(IReadOnlyList<string> inputs, Stream output)
    {
        ArgumentNullException.ThrowIfNull(inputs);
        ArgumentNullException.ThrowIfNull(output);
        var readers = new List<LaneFileReader>();
        try
        {
            foreach (string p in inputs)
            {
                readers.Add(LaneFileReader.Open(p, sizeRequired: false, keepRawLine: true));
            }

            var heads = new (LaneRecord Record, byte[] Raw)?[readers.Count];
            for (int i = 0; i < readers.Count; i++)
            {
                heads[i] = Next(readers[i]);
            }

            ShardSpec?[] shards = CheckShards(inputs, heads);

            string? last = null;
            long count = 0;
            (string Hash, string File)? config = null;
            while (true)
            {
                int best = -1;
                for (int i = 0; i < heads.Length; i++)
                {
                    if (heads[i] is { } h && (best < 0 || string.CompareOrdinal(h.Record.Frame, heads[best]!.Value.Record.Frame) < 0))
                    {
                        best = i;
                    }
                }

                if (best < 0)
                {
                    return count;
                }

                (LaneRecord rec, byte[] raw) = heads[best]!.Value;
                if (last is not null && string.CompareOrdinal(rec.Frame, last) <= 0)
                {
                    throw BadInputException.At(
                        inputs[best],
                        rec.LineNumber,
                        "frame",
                        string.Equals(rec.Frame, last, StringComparison.Ordinal)
                            ? $"frame '{rec.Frame}' appears in more than one input"
                            : $"frame '{rec.Frame}' is out of order (inputs must be sorted by frame key, as detect writes them)");
                }

                if (rec.ExtraJson.FirstOrDefault(kv => kv.Key == "config").Value is string hash)
                {
                    config ??= (hash, inputs[best]);
                    if (!string.Equals(hash, config.Value.Hash, StringComparison.Ordinal))
                    {
                        throw BadInputException.At(
                            inputs[best],
                            rec.LineNumber,
                            "config",
                            $"frame '{rec.Frame}' was detected with configuration {hash} but {config.Value.File} with {config.Value.Hash}: shards of one run must use one preset");
                    }
                }

                WriteWithoutShard(output, inputs[best], rec, raw, shards[best]);
                output.WriteByte((byte)'\n');
                last = rec.Frame;
                count++;
                heads[best] = Next(readers[best]);
            }
        }
        finally
        {
            foreach (LaneFileReader r in readers)
            {
                r.Dispose();
            }
        }
    }

    /// <summary>
    /// Reads the shard of each input from its first record and checks that the inputs are the shards 0..N−1 of one
    /// run, each once. Returns each input's shard (all null when no input names one: files of unsharded runs).
    /// </summary>
    private static ShardSpec?[] CheckShards(IReadOnlyList<string> inputs, (LaneRecord Record, byte[] Raw)?[] heads)
    {
        var shards = new ShardSpec?[inputs.Count];
        int named = -1;
        for (int i = 0; i < inputs.Count; i++)
        {
            if (heads[i] is { } h)
            {
                shards[i] = ShardOf(inputs[i], h.Record);
                if (shards[i] is not null && named < 0)
                {
                    named = i;
                }
            }
        }

        if (named < 0)
        {
            return shards;
        }

        int count = shards[named]!.Value.Count;
        var owner = new Dictionary<int, int>();
        for (int i = 0; i < inputs.Count; i++)
        {
            if (heads[i] is not { } h)
            {
                continue;
            }

            if (shards[i] is not { } s)
            {
                throw BadInputException.At(inputs[i], h.Record.LineNumber, "shard", $"has no shard key, but {inputs[named]} is shard {shards[named]} of a sharded detect run: merge the shards of one run only");
            }

            if (s.Count != count)
            {
                throw BadInputException.At(inputs[i], h.Record.LineNumber, "shard", $"is shard {s} but {inputs[named]} is shard {shards[named]}: shards of one run have one shard count");
            }

            if (owner.TryGetValue(s.Index, out int first))
            {
                throw BadInputException.At(inputs[i], h.Record.LineNumber, "shard", $"shard {s} is given twice ({inputs[first]} and {inputs[i]})");
            }

            owner[s.Index] = i;
        }

        if (inputs.Count != count)
        {
            var missing = Enumerable.Range(0, count).Where(k => !owner.ContainsKey(k)).Select(k => k.ToString(CultureInfo.InvariantCulture)).ToList();
            int empty = inputs.Count - owner.Count;
            string more = inputs.Count > count
                ? $"{inputs.Count} lane files given for {count} shards"
                : $"shards {string.Join(", ", missing)} of {count} are missing" + (empty > 0 ? $" ({empty} of the inputs hold no records and may be some of them)" : string.Empty);
            throw new BadInputException($"merge: {more} ({BadInputException.Files(inputs)})");
        }

        return shards;
    }

    private static ShardSpec? ShardOf(string file, LaneRecord record)
    {
        string? raw = record.ExtraJson.FirstOrDefault(kv => kv.Key == "shard").Value;
        if (raw is null)
        {
            return null;
        }

        try
        {
            return raw.Length >= 2 && raw[0] == '"' && raw[^1] == '"' ? ShardSpec.Parse(raw[1..^1]) : throw new FormatException("not a string");
        }
        catch (FormatException)
        {
            throw BadInputException.At(file, record.LineNumber, "shard", "is not a shard \"K/N\" (0 <= K < N)");
        }
    }

    /// <summary>Checks a record against its input's shard and removes the trailing <c>,"shard":"K/N"</c> detect wrote.</summary>
    private static void WriteWithoutShard(Stream output, string file, LaneRecord record, byte[] raw, ShardSpec? shard)
    {
        if (shard is not { } s)
        {
            output.Write(raw);
            return;
        }

        if (ShardOf(file, record) != s)
        {
            throw BadInputException.At(file, record.LineNumber, "shard", $"frame '{record.Frame}' names another shard than the first record of its file ({s})");
        }

        if (!s.ContainsFrame(record.Frame))
        {
            throw BadInputException.At(file, record.LineNumber, "shard", $"frame '{record.Frame}' does not belong to shard {s}");
        }

        byte[] suffix = Encoding.UTF8.GetBytes(",\"shard\":\"" + s.ToString() + "\"}");
        if (raw.AsSpan().EndsWith(suffix))
        {
            output.Write(raw, 0, raw.Length - suffix.Length);
            output.WriteByte((byte)'}');
        }
        else
        {
            output.Write(raw);
        }
    }

    private static (LaneRecord, byte[])? Next(LaneFileReader reader) =>
        reader.TryRead(out LaneRecord r) ? (r, reader.RawLine!) : null;
}
