using System.Globalization;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Metrics;

/// <summary>Merges partial score states of shards 0..N−1 back into the results of one unsharded run.</summary>
public static class ScoreStateMerge
{
    /// <summary>Refuses states whose inputs (same paths) had different contents, naming the input and both states.</summary>
    private static void CheckSameContents(IReadOnlyList<string> paths, IReadOnlyList<ScoreStateHeader> headers)
    {
        ScoreStateHeader h0 = headers[0];
        string[] names = [h0.Truth, .. h0.Systems.Select(s => s.Path)];
        for (int i = 1; i < headers.Count; i++)
        {
            IReadOnlyList<string> a = h0.InputHashes, b = headers[i].InputHashes;
            if (a.Count != b.Count)
            {
                throw BadInputException.At(paths[i], 1, "input_sha256", $"records {b.Count.ToString(CultureInfo.InvariantCulture)} input hashes where {paths[0]} records {a.Count.ToString(CultureInfo.InvariantCulture)} (states of different jobs or versions)");
            }

            for (int k = 0; k < a.Count; k++)
            {
                if (!string.Equals(a[k], b[k], StringComparison.Ordinal))
                {
                    string input = k < names.Length ? names[k] : "input " + k.ToString(CultureInfo.InvariantCulture);
                    throw BadInputException.At(paths[i], 1, "input_sha256", $"was made from different contents of {input} than {paths[0]} ({b[k]} vs {a[k]}); re-run every shard on the same inputs");
                }
            }
        }
    }

    /// <summary>
    /// Checks that the states belong to one job and cover every shard once, then replays their frames in truth
    /// order (a k-way merge on the frame ordinal; each state is already in that order).
    /// </summary>
    /// <param name="paths">State files.</param>
    /// <param name="onHeader">Called once the headers are checked, before any frame.</param>
    /// <param name="onFrame">Called for each frame in truth order (e.g. to write the CSV).</param>
    /// <param name="onMask">Called for each frame's mask IoU (states with mask IoU), system by system, frames in ordinal path order.</param>
    public static (ScoreStateHeader Header, SystemScore[] Results) Merge(
        IReadOnlyList<string> paths, Action<ScoreStateHeader>? onHeader = null, Action<IReadOnlyList<FrameScore>>? onFrame = null, Action<MaskFrameState>? onMask = null)
    {
        ArgumentNullException.ThrowIfNull(paths);
        if (paths.Count == 0)
        {
            throw new BadInputException("merge: no state files given");
        }

        var readers = new List<ScoreStateReader>();
        try
        {
            foreach (string p in paths)
            {
                readers.Add(ScoreStateReader.Open(p));
            }

            ScoreStateHeader h0 = readers[0].Header;
            CheckSameContents(paths, [.. readers.Select(r => r.Header)]);
            ShardCoverage.Check(paths, [.. readers.Select(r => (r.Header.Shard, r.Header.JobKey()))], string.Empty, "truth, systems, settings or shard count");

            onHeader?.Invoke(h0);
            SystemScore[] results = ScoreRun.CreateResults(h0.Systems, h0.Settings);
            if (h0.Coverage is { } coverage && coverage.Count == results.Length)
            {
                for (int s = 0; s < results.Length; s++)
                {
                    results[s].Coverage = coverage[s];
                }
            }

            int halfIndex = h0.Settings.HalfIndex;
            var heads = new FrameScore[]?[readers.Count];
            for (int i = 0; i < readers.Count; i++)
            {
                heads[i] = readers[i].Next();
            }

            int expected = 0;
            while (true)
            {
                int best = -1;
                for (int i = 0; i < heads.Length; i++)
                {
                    if (heads[i] is { } hd && (best < 0 || hd[0].Ordinal < heads[best]![0].Ordinal))
                    {
                        best = i;
                    }
                }

                if (best < 0)
                {
                    break;
                }

                FrameScore[] row = heads[best]!;
                if (row[0].Ordinal != expected)
                {
                    throw BadInputException.At(paths[best], 0, null, string.Create(
                        CultureInfo.InvariantCulture,
                        $"frame '{row[0].Frame}' has ordinal {row[0].Ordinal} where {expected} was expected (a state is incomplete, duplicated or out of order)"));
                }

                ScoreRun.Accumulate(results, row, halfIndex);
                onFrame?.Invoke(row);
                expected++;
                heads[best] = readers[best].Next();
            }

            if (expected != h0.TruthFrames)
            {
                throw new BadInputException(string.Create(CultureInfo.InvariantCulture, $"merge: the states hold {expected} frames but the truth has {h0.TruthFrames} (a shard run was interrupted?) ({BadInputException.Files(paths)})"));
            }

            if (h0.MaskIou)
            {
                // Replayed in the unsharded run's order (system, then mask path, ordinal), so the sums are the same bytes.
                var masks = new List<MaskFrameState>();
                foreach (ScoreStateReader r in readers)
                {
                    masks.AddRange(r.ReadMasks());
                }

                masks.Sort((a, b) => a.System != b.System ? a.System.CompareTo(b.System) : string.CompareOrdinal(a.Frame, b.Frame));
                for (int i = 1; i < masks.Count; i++)
                {
                    if (masks[i].System == masks[i - 1].System && masks[i].Frame == masks[i - 1].Frame)
                    {
                        throw new BadInputException($"merge: the mask IoU of '{masks[i].Frame}' appears in more than one state ({BadInputException.Files(paths)})");
                    }
                }

                foreach (MaskFrameState m in masks)
                {
                    onMask?.Invoke(m);
                }
            }

            return (h0, results);
        }
        finally
        {
            foreach (ScoreStateReader r in readers)
            {
                r.Dispose();
            }
        }
    }
}
