using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Random;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class ShardMergeTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    // Issue requirement: shards 0..N-1 merged equal the unsharded output byte for byte (N = 1, 2, 7): JSON, CSV and
    // the stdout table, with two systems so the paired bootstrap is covered too.
    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(7)]
    public void ScoreShards_Merged_EqualUnshardedByteForByte(int n)
    {
        (string truth, string pred) = WriteSet(60);
        string[] common = ["--truth", truth, "--pred", "net=" + pred, "--pred", "same=" + truth, "--bootstrap", "50", "--bootstrap-seed", "9", "--iou", "0.4"];
        (int exit, string fullOut, _) = CliRunner.Run(["score", .. common, "--json", dir.File("full.json"), "--csv", dir.File("full.csv")]);
        Assert.Equal(0, exit);
        using (var doc = System.Text.Json.JsonDocument.Parse(File.ReadAllBytes(dir.File("full.json"))))
        {
            // The per-tag intervals and paired differences are part of what merge must reproduce.
            Assert.Equal(2, doc.RootElement.GetProperty("systems").GetProperty("net").GetProperty("by_tag").GetProperty("dusk").GetProperty("intervals").GetProperty("mf1").GetArrayLength());
            Assert.True(doc.RootElement.GetProperty("paired").GetProperty("net - same").GetProperty("by_tag").GetProperty("dusk").TryGetProperty("f1@0.50", out _));
        }

        var states = new List<string>();
        for (int k = 0; k < n; k++)
        {
            string state = dir.File($"s{k}.state");
            Assert.Equal(0, CliRunner.Run(["score", .. common, "--shard", $"{k}/{n}", "--partial", state, "--threads", (1 + (k % 2)).ToString(System.Globalization.CultureInfo.InvariantCulture)]).Exit);
            states.Add(state);
        }

        states.Reverse(); // order of the inputs must not matter
        (int mExit, string mergedOut, _) = CliRunner.Run(["merge", .. states, "-o", dir.File("merged.json"), "--csv", dir.File("merged.csv")]);
        Assert.Equal(0, mExit);
        Assert.Equal(File.ReadAllBytes(dir.File("full.json")), File.ReadAllBytes(dir.File("merged.json")));
        Assert.Equal(File.ReadAllBytes(dir.File("full.csv")), File.ReadAllBytes(dir.File("merged.csv")));
        Assert.Equal(fullOut, mergedOut);
    }

    [Fact]
    public void Merge_MissingOrDuplicatedShard_Exits3()
    {
        (string truth, string pred) = WriteSet(20);
        for (int k = 0; k < 3; k++)
        {
            Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", pred, "--shard", $"{k}/3", "--partial", dir.File($"s{k}.state")).Exit);
        }

        (int exit, _, string err) = CliRunner.Run("merge", dir.File("s0.state"), dir.File("s2.state"), "-o", dir.File("m.json"));
        Assert.Equal(3, exit);
        Assert.Contains("shards 1 of 3 are missing", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run("merge", dir.File("s0.state"), dir.File("s0.state"), dir.File("s1.state"), "-o", dir.File("m.json"));
        Assert.Equal(3, exit);
        Assert.Contains("given twice", err, StringComparison.Ordinal);
        Assert.False(File.Exists(dir.File("m.json")));
    }

    // Lane files from sharded runs, each in frame-key order, merge back into the sorted whole, verbatim.
    [Fact]
    public void MergeLaneFiles_ShardedByHash_EqualsWholeFile()
    {
        (string truth, _) = WriteSet(40);
        var shards = new List<string>();
        var spec = new List<Core.Sharding.ShardSpec>();
        for (int k = 0; k < 3; k++)
        {
            spec.Add(new Core.Sharding.ShardSpec(k, 3));
            shards.Add(dir.File($"l{k}.lanes.jsonl"));
        }

        string[] lines = File.ReadAllLines(truth);
        for (int k = 0; k < 3; k++)
        {
            File.WriteAllLines(shards[k], lines.Where(l => spec[k].Contains(l[10..l.IndexOf('"', 10)])));
        }

        Assert.Equal(0, CliRunner.Run(["merge", .. shards, "-o", dir.File("all.lanes.jsonl")]).Exit);
        Assert.Equal(File.ReadAllBytes(truth), File.ReadAllBytes(dir.File("all.lanes.jsonl")));
        (int exit, _, string err) = CliRunner.Run("merge", shards[0], shards[0], "-o", dir.File("dup.lanes.jsonl"));
        Assert.Equal(3, exit);
        Assert.Contains("appears in more than one input", err, StringComparison.Ordinal);
    }

    // Source: FNV test vectors (Fowler/Noll/Vo reference code, from memory): FNV-1a 64 of "" is the offset basis
    // 0xcbf29ce484222325 and of "a" is 0xaf63dc4c8601ec8c.
    [Fact]
    public void ShardHash_IsFnv1a64()
    {
        Assert.Equal(0xcbf29ce484222325UL, Core.Sharding.ShardSpec.Fnv1a64(string.Empty));
        Assert.Equal(0xaf63dc4c8601ec8cUL, Core.Sharding.ShardSpec.Fnv1a64("a"));
    }

    private (string Truth, string Pred) WriteSet(int frames)
    {
        string truth = dir.File("truth.lanes.jsonl"), pred = dir.File("pred.lanes.jsonl");
        var rng = new SplitMix64(3);
        var t = new List<LaneRecord>();
        var p = new List<LaneRecord>();
        for (int i = 0; i < frames; i++)
        {
            string frame = $"route/f{i:000}.png";
            Lane[] lanes = [.. Enumerable.Range(0, 1 + rng.NextInt(4)).Select(k => Lanes.Of((200 + (300 * k) + rng.NextDouble(0, 50), 719), (400 + (150 * k), 300)))];
            t.Add(new LaneRecord { Frame = frame, Width = 1280, Height = 720, Lanes = lanes, Tags = i % 3 == 0 ? ["dusk"] : [] });
            if (i % 4 != 0)
            {
                p.Add(Lanes.Pred(frame, [.. lanes.Skip(i % 2).Select(l => Lanes.Of((l.Points[0].X + rng.NextDouble(-30, 30), 719), (l.Points[1].X, 300)))]));
            }
        }

        Lanes.WriteFile(truth, t);
        Lanes.WriteFile(pred, p);
        return (truth, pred);
    }
}
