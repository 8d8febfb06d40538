using System.Globalization;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

// Issue requirement (#8): `audit --shard K/N` partitions frames deterministically, and `merge` of the shards' partial
// states writes exactly what one unsharded run writes. The audit's temporal rules need whole sequences, so the
// partition hashes the sequence name (the key without its trailing number), not the frame key.
public sealed class AuditShardTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(7)]
    public void AuditShards_Merged_EqualUnshardedByteForByte(int n)
    {
        (string pred, string baseline) = WriteSet();
        string outFile = dir.File("out/f.jsonl"), page = dir.File("out/f.html");
        Directory.CreateDirectory(dir.File("out"));
        string[] common = ["--pred", pred, "--baseline", baseline, "--fps", "10"];
        string[] outputs = ["-o", outFile, "--mine", "25", "--fail-on", "warning", "--overlay-count", "3", "--report", page, "--generated-at", "2026-01-02T03:04:05Z"];

        (int exit, string fullOut, string fullErr) = CliRunner.Run(["audit", .. common, .. outputs, "--threads", "2"]);
        Assert.True(exit == 4, fullErr); // the gate fails on the injected faults, after writing everything
        Dictionary<string, byte[]> full = Snapshot();
        Assert.True(full.Count >= 6, string.Join(", ", full.Keys)); // findings, mine list, page, three overlays
        Directory.Delete(dir.File("out"), recursive: true);
        Directory.CreateDirectory(dir.File("out"));

        var states = new List<string>();
        for (int k = 0; k < n; k++)
        {
            string state = dir.File($"a{k}.state");
            (int e, _, string err) = CliRunner.Run(["audit", .. common, "--shard", $"{k}/{n}", "--partial", state, "--threads", (1 + (k % 2)).ToString(CultureInfo.InvariantCulture)]);
            Assert.True(e == 0, err);
            states.Add(state);
        }

        states.Reverse(); // the order of the inputs must not matter
        (int mExit, string mergedOut, string mErr) = CliRunner.Run(["merge", .. states, .. outputs]);
        Assert.True(mExit == 4, mErr);
        Assert.Equal(fullOut, mergedOut);
        Dictionary<string, byte[]> merged = Snapshot();
        Assert.Equal(full.Keys.Order(StringComparer.Ordinal), merged.Keys.Order(StringComparer.Ordinal));
        foreach ((string name, byte[] bytes) in full)
        {
            Assert.True(bytes.AsSpan().SequenceEqual(merged[name]), name + " differs");
        }
    }

    // Issue 13 item 4: merge rebuilt the audit settings from a few text entries of the state and dropped the others
    // (the frame rate reached the summary JSON as the default 10). With non-default frame rate, design speed and horizon
    // row, every output of the merged shards (findings, labelling list, overlays, page, summary JSON, stdout) must
    // equal the unsharded run's byte for byte; the settings change findings (LBA-T01's limit scales with 1/fps, LBA-I03
    // and LBA-I08 read the horizon, LBA-I08 the design speed), so a shard that lost one would differ too.
    [Fact]
    public void AuditShards_NonDefaultFpsDesignSpeedHorizon_MergedEqualUnshardedByteForByte()
    {
        (string pred, string baseline) = WriteSet();
        string outFile = dir.File("out/f.jsonl");
        Directory.CreateDirectory(dir.File("out"));
        string[] common = ["--pred", pred, "--baseline", baseline, "--fps", "25", "--design-speed-kmh", "60", "--horizon-row", "250.5", "--size", "1280x720"];
        string[] outputs = ["-o", outFile, "--mine", "5", "--overlay-count", "2", "--report", dir.File("out/f.html"), "--generated-at", "2026-01-02T03:04:05Z", "--summary-json", dir.File("out/f.summary.json")];

        (int exit, string fullOut, string fullErr) = CliRunner.Run(["audit", .. common, .. outputs]);
        Assert.True(exit == 0, fullErr);
        Dictionary<string, byte[]> full = Snapshot();
        Assert.Contains("\"fps\": 25", File.ReadAllText(dir.File("out/f.summary.json")), StringComparison.Ordinal);
        Directory.Delete(dir.File("out"), recursive: true);
        Directory.CreateDirectory(dir.File("out"));

        var states = new List<string>();
        for (int k = 0; k < 3; k++)
        {
            string state = dir.File($"p{k}.state");
            (int e, _, string err) = CliRunner.Run(["audit", .. common, "--shard", $"{k}/3", "--partial", state]);
            Assert.True(e == 0, err);
            states.Add(state);
        }

        (int mExit, string mergedOut, string mErr) = CliRunner.Run(["merge", .. states, .. outputs]);
        Assert.True(mExit == 0, mErr);
        Assert.Equal(fullOut, mergedOut);
        Dictionary<string, byte[]> merged = Snapshot();
        Assert.Equal(full.Keys.Order(StringComparer.Ordinal), merged.Keys.Order(StringComparer.Ordinal));
        foreach ((string name, byte[] bytes) in full)
        {
            Assert.True(bytes.AsSpan().SequenceEqual(merged[name]), name + " differs");
        }

        // Shards run with another frame rate belong to another job.
        string other = dir.File("p1-fps.state");
        Assert.Equal(0, CliRunner.Run(["audit", .. common[..4], "--fps", "30", "--design-speed-kmh", "60", "--horizon-row", "250.5", "--size", "1280x720", "--shard", "1/3", "--partial", other]).Exit);
        (int oExit, _, string oErr) = CliRunner.Run("merge", states[0], other, states[2], "-o", dir.File("o.jsonl"));
        Assert.Equal(3, oExit);
        Assert.Contains("its settings.frames_per_second is '30' where that state's is '25'", oErr, StringComparison.Ordinal);
    }

    // States of the build before the typed job (version 1: the job as text) are refused with a clear message.
    [Fact]
    public void Merge_Version1State_Exits3NamingTheVersion()
    {
        string state = dir.File("old.state");
        File.WriteAllText(state, "{\"format\":\"lanebaseline-audit-state\",\"version\":1,\"shard_index\":0,\"shard_count\":1,\"input_frames\":0,\"frames\":0,\"compared_frames\":0,\"job\":{\"pred\":\"p.lanes.jsonl\",\"fps\":\"25\"}}\n");
        (int exit, _, string err) = CliRunner.Run("merge", state, "-o", dir.File("m.jsonl"));
        Assert.Equal(3, exit);
        Assert.Contains("old.state:1: version: an audit state of an older build (version 1", err, StringComparison.Ordinal);
        Assert.False(File.Exists(dir.File("m.jsonl")));
    }

    // A sequence is never split: every frame of it lands in the shard its name hashes to.
    [Fact]
    public void Partition_KeepsSequencesWhole()
    {
        Assert.Equal("seq03/*.png", SequenceKey.Of("seq03/000017.png"));
        Assert.Equal("clip.mp4#*", SequenceKey.Of("clip.mp4#000005"));
        Assert.Equal("still_a.png", SequenceKey.Of("still_a.png"));
        var spec = new ShardSpec(1, 3);
        bool inShard = spec.Contains(SequenceKey.Of("seq03/000000.png"));
        Assert.All(Enumerable.Range(0, 50), f => Assert.Equal(inShard, spec.Contains(SequenceKey.Of($"seq03/{f:000000}.png"))));
    }

    [Fact]
    public void Merge_MissingShard_OtherJob_OrIncompleteState_Exits3WithoutOutput()
    {
        (string pred, string baseline) = WriteSet();
        for (int k = 0; k < 3; k++)
        {
            Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--shard", $"{k}/3", "--partial", dir.File($"s{k}.state")).Exit);
        }

        Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", baseline, "--shard", "1/3", "--partial", dir.File("other.state")).Exit);
        string outFile = dir.File("m.jsonl");

        (int exit, _, string err) = CliRunner.Run("merge", dir.File("s0.state"), dir.File("s2.state"), "-o", outFile);
        Assert.Equal(3, exit);
        Assert.Contains("audit shards 1 of 3 are missing", err, StringComparison.Ordinal);

        (exit, _, err) = CliRunner.Run("merge", dir.File("s0.state"), dir.File("other.state"), dir.File("s2.state"), "-o", outFile);
        Assert.Equal(3, exit);
        Assert.Contains("different audit job", err, StringComparison.Ordinal);

        // A state whose frame count was edited (as if its run had stopped early) no longer covers the predictions.
        string[] lines = File.ReadAllLines(dir.File("s1.state"));
        lines[0] = System.Text.RegularExpressions.Regex.Replace(lines[0], "\"frames\":(\\d+)", m => "\"frames\":" + (int.Parse(m.Groups[1].Value, CultureInfo.InvariantCulture) - 1).ToString(CultureInfo.InvariantCulture));
        File.WriteAllLines(dir.File("s1-short.state"), lines);
        (exit, _, err) = CliRunner.Run("merge", dir.File("s0.state"), dir.File("s1-short.state"), dir.File("s2.state"), "-o", outFile);
        Assert.Equal(3, exit);
        Assert.Contains("but the predictions hold", err, StringComparison.Ordinal);

        File.WriteAllLines(dir.File("s1-bad.state"), [lines[0], "{\"t\":\"finding\",\"frame\":\"x\",\"ordinal\":1,\"rule\":\"NOPE\"}"]);
        (exit, _, err) = CliRunner.Run("merge", dir.File("s0.state"), dir.File("s1-bad.state"), dir.File("s2.state"), "-o", outFile);
        Assert.Equal(3, exit);
        Assert.Contains("s1-bad.state:2: rule: unknown rule 'NOPE'", err, StringComparison.Ordinal);
        Assert.False(File.Exists(outFile));
    }

    [Fact]
    public void Partial_WithFinalOutputs_IsAUsageError()
    {
        (string pred, _) = WriteSet();
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", pred, "--shard", "0/2", "--partial", dir.File("s.state"), "--mine", "3");
        Assert.Equal(2, exit);
        Assert.Contains("give -o, --overlay-count, --mine, --fail-on and --report to merge", err, StringComparison.Ordinal);
        Assert.False(File.Exists(dir.File("s.state")));
    }

    private Dictionary<string, byte[]> Snapshot() =>
        Directory.GetFiles(dir.File("out"), "*", SearchOption.AllDirectories)
            .ToDictionary(p => Path.GetRelativePath(dir.File("out"), p), File.ReadAllBytes, StringComparer.Ordinal);

    // Twelve 12-frame sequences from the synthetic road, with faults of several rules, two sequences interleaved frame
    // by frame (so a shard must not join frames another shard's frames separate), stills without a frame number, and
    // a baseline that drops lanes so disagreement varies (with ties).
    private (string Pred, string Baseline) WriteSet()
    {
        var seqs = Enumerable.Range(0, 12).Select(s => SyntheticRoad.Clean(seed: 17, sequences: 12, framesPerSequence: 12).Skip(s * 12).Take(12).ToList()).ToList();
        static LaneRecord With(LaneRecord r, IEnumerable<Lane>? lanes = null, string? frame = null) =>
            new() { Frame = frame ?? r.Frame, Width = r.Width, Height = r.Height, Tags = r.Tags, Lanes = [.. lanes ?? r.Lanes] };
        static LaneRecord Shift(LaneRecord r, int lane, double dx) =>
            With(r, r.Lanes.Select((l, i) => i == lane ? new Lane { Points = [.. l.Points.Select(p => p with { X = p.X + dx })], Slot = l.Slot } : l));
        seqs[0][6] = Shift(seqs[0][6], 1, 90);
        seqs[1].RemoveAt(4);
        seqs[2][7] = With(seqs[2][7], seqs[2][7].Lanes.Skip(1));
        seqs[3][2] = Shift(seqs[3][2], 2, -400); // crosses its neighbour
        seqs[5][9] = Shift(seqs[5][9], 0, 120);
        seqs[8].RemoveRange(3, 2);
        seqs[10][0] = With(seqs[10][0], seqs[10][0].Lanes.Take(1));

        var records = new List<LaneRecord>();
        for (int s = 0; s < 12; s++)
        {
            if (s == 6)
            {
                continue;
            }

            if (s == 5)
            {
                for (int f = 0; f < 12; f++)
                {
                    records.Add(seqs[5][f]);
                    records.Add(seqs[6][f]);
                }

                continue;
            }

            records.AddRange(seqs[s]);
        }

        records.Add(With(seqs[4][3], frame: "still_a.png"));
        records.Add(With(Shift(seqs[7][3], 1, 300), frame: "still_b.png"));

        var baseline = records.Select((r, i) => With(r, r.Lanes.Where((_, j) => (i + j) % 5 != 0))).ToList();
        string pred = dir.File("pred.lanes.jsonl"), basePath = dir.File("base.lanes.jsonl");
        Lanes.WriteFile(pred, records);
        Lanes.WriteFile(basePath, baseline);
        return (pred, basePath);
    }
}
