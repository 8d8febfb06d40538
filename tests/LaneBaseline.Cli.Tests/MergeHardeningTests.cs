using System.Text.RegularExpressions;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

// Issue 17 item 3: merge refuses states that one honest sharded run cannot have written, each with exit 3 and a
// message naming the state, the line and the reason, and writes nothing. The bounds checked are those of the metric
// definitions (docs/metrics.md): IoU in [0, 1], at most min(truth, predicted) assigned pairs, accuracy per pair in [0, 1].
public sealed partial class MergeHardeningTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void ScoreStates_FromDifferentContentsOfOnePath_AreRefused()
    {
        (string truth, string pred) = WriteSet();
        string s0 = dir.File("s0.state"), s1 = dir.File("s1.state");
        Assert.Equal(0, Partial(truth, pred, "0/2", s0));
        File.WriteAllText(pred, File.ReadAllText(pred).Replace("300", "290", StringComparison.Ordinal)); // same path, other contents
        Assert.Equal(0, Partial(truth, pred, "1/2", s1));
        AssertRefused(["merge", s0, s1, "-o", dir.File("m.json")], "different contents of " + pred);
    }

    [Theory]
    [InlineData("acc", "1e9", "point accuracy sum")]
    [InlineData("w", "0", "sizes are positive")]
    [InlineData("iou", "[0.5,0.5,0.5,0.5,0.5,0.5,0.5,0.5]", "assigned IoUs")]
    [InlineData("iou", "[1.5]", "IoU outside [0, 1]")]
    [InlineData("m", "-1", "point accuracy sum")]
    [InlineData("o", "999", "outside the truth")]
    [InlineData("cp", "[99,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0]", "confidence cut-off counts")]
    public void ScoreStates_TamperedFrameLine_IsRefused(string key, string value, string expected)
    {
        (string truth, string pred) = WriteSet();
        string s0 = dir.File("s0.state"), s1 = dir.File("s1.state");
        Assert.Equal(0, Partial(truth, pred, "0/2", s0));
        Assert.Equal(0, Partial(truth, pred, "1/2", s1));
        string victim = File.ReadAllLines(s0).Length > 1 ? s0 : s1;
        string[] lines = File.ReadAllLines(victim);
        Regex field = new("\"" + key + "\":(\\[[^\\]]*\\]|[^,}]+)");
        Assert.Matches(field, lines[1]);
        lines[1] = field.Replace(lines[1], "\"" + key + "\":" + value, 1);
        File.WriteAllLines(victim, lines);
        AssertRefused(["merge", s0, s1, "-o", dir.File("m.json")], expected);
    }

    [Fact]
    public void ScoreStates_ForeignFrameKey_AndMissingShard_AreRefused()
    {
        (string truth, string pred) = WriteSet();
        string s0 = dir.File("s0.state"), s1 = dir.File("s1.state");
        Assert.Equal(0, Partial(truth, pred, "0/2", s0));
        Assert.Equal(0, Partial(truth, pred, "1/2", s1));
        AssertRefused(["merge", s0, "-o", dir.File("m.json")], "shards 1 of 2 are missing");

        // A frame line of shard 1 pasted into shard 0's state.
        string[] l0 = File.ReadAllLines(s0), l1 = File.ReadAllLines(s1);
        Assert.True(l0.Length > 1 && l1.Length > 1, "both shards hold frames");
        File.WriteAllLines(s0, [.. l0, l1[1]]);
        AssertRefused(["merge", s0, s1, "-o", dir.File("m.json")], "a foreign frame key");
    }

    [Fact]
    public void LaneFileShards_OfDifferentPresets_AreRefused()
    {
        string a = dir.File("a.lanes.jsonl"), b = dir.File("b.lanes.jsonl");
        File.WriteAllText(a, "{\"frame\":\"a/000001.png\",\"width\":64,\"height\":48,\"lanes\":[],\"config\":\"sha256:1111111111111111\"}\n");
        File.WriteAllText(b, "{\"frame\":\"b/000001.png\",\"width\":64,\"height\":48,\"lanes\":[],\"config\":\"sha256:2222222222222222\"}\n");
        AssertRefused(["merge", a, b, "-o", dir.File("m.lanes.jsonl")], "one preset");
    }

    [Fact]
    public void AuditStates_FromDifferentContentsOfOnePath_AreRefused()
    {
        (string truth, string pred) = WriteSet();
        string s0 = dir.File("a0.state"), s1 = dir.File("a1.state");
        Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--shard", "0/2", "--partial", s0).Exit);
        File.AppendAllText(truth, "{\"frame\":\"extra/000001.png\",\"width\":320,\"height\":240,\"lanes\":[]}\n");
        Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--shard", "1/2", "--partial", s1).Exit);
        AssertRefused(["merge", s0, s1, "-o", dir.File("f.jsonl")], "different contents of " + truth);
    }

    [Fact]
    public void AuditStates_ForeignFrameKey_IsRefused()
    {
        (string truth, string pred) = WriteSet();
        string s0 = dir.File("a0.state"), s1 = dir.File("a1.state");
        Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--shard", "0/2", "--partial", s0).Exit);
        Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--shard", "1/2", "--partial", s1).Exit);
        string[] l0 = File.ReadAllLines(s0), l1 = File.ReadAllLines(s1);
        Assert.True(l0.Length > 1 && l1.Length > 1, "both shards hold frames");
        File.WriteAllLines(s0, [.. l0, l1[1]]);
        AssertRefused(["merge", s0, s1, "-o", dir.File("f.jsonl")], "a foreign frame key");
    }

    private void AssertRefused(string[] args, string expected)
    {
        string output = args[Array.IndexOf(args, "-o") + 1];
        (int exit, _, string err) = CliRunner.Run(args);
        Assert.True(exit == 3, $"exit {exit}: {err}");
        Assert.Contains(expected, err, StringComparison.Ordinal);
        Assert.StartsWith("error: ", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));
    }

    private static int Partial(string truth, string pred, string shard, string state)
    {
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--shard", shard, "--partial", state, "--bootstrap", "0");
        Assert.True(exit == 0, err);
        return exit;
    }

    // Eight sequences of one 320x240 frame with two truth lanes; the prediction finds one lane exactly and one 100 px
    // off, so every frame line carries non-zero counts to tamper with.
    private (string Truth, string Pred) WriteSet()
    {
        string truth = dir.File("truth.lanes.jsonl"), pred = dir.File("pred.lanes.jsonl");
        var t = new List<LaneRecord>();
        var p = new List<LaneRecord>();
        foreach (string seq in new[] { "a", "b", "c", "d", "e", "f", "g", "h" })
        {
            t.Add(Lanes.Truth(seq + "/000001.png", 320, 240, Lanes.Vertical(100, 240), Lanes.Vertical(200, 240)));
            p.Add(Lanes.Truth(seq + "/000001.png", 320, 240, Lanes.Vertical(100, 240), Lanes.Vertical(300, 240)));
        }

        Lanes.WriteFile(truth, t);
        Lanes.WriteFile(pred, p);
        return (truth, pred);
    }
}
