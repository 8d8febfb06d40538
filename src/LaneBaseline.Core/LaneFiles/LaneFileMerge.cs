namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// Merges lane files written by sharded runs into the file one unsharded run writes: records are copied verbatim
/// (byte for byte) in ascending ordinal order of their frame keys, the order in which <c>detect</c> visits a folder.
/// Each input must already be in that order; a frame present in two inputs is an error, and so are records of
/// different detect configurations (their <c>config</c> hashes differ: shards run with different presets).
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

                output.Write(raw);
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

    private static (LaneRecord, byte[])? Next(LaneFileReader reader) =>
        reader.TryRead(out LaneRecord r) ? (r, reader.RawLine!) : null;
}
