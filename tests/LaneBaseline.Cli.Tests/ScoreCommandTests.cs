using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class ScoreCommandTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    // Hand-computed over three 1920x1080 frames (lane width 30 px, 31 px footprint):
    //  a: truth x=400; prediction x=415 (IoU 8/23 = 0.348: TP at 0.10 and 0.30 only); point: |dx| = 15 < 30 (20 px x 1920/1280) -> acc 1.
    //  b: truth x=400 and x=1000; predictions x=400 (IoU 1) and x=1300 (IoU 0) -> TP 1 at every threshold, 1 FP, 1 FN;
    //     point: 1 matched, pair acc 1 and 0.
    //  c: truth x=700; missing from the predictions -> 1 FN; point acc 0.
    // Totals: truth 4, pred 3. At 0.50: TP 1, FP 2, FN 3 -> P 1/3, R 1/4, F1 = 2/7.
    // At 0.10: TP 2, FP 1, FN 2 -> P 2/3, R 1/2, F1 = 4/7. Point: acc (1+1+0+0)/4 = 0.5, matched 2,
    // FP rate (3-2)/3, FN rate (4-2)/4.
    [Fact]
    public void Score_HandComputedSet_MatchesEveryCount()
    {
        (string truth, string pred) = WriteHandSet();
        string json = dir.File("s.json"), csv = dir.File("s.csv");
        (int exit, string stdout, _) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--json", json, "--csv", csv, "--bootstrap", "100", "--threads", "1");
        Assert.Equal(0, exit);
        Assert.Contains("F1@.50", stdout, StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        JsonElement root = doc.RootElement;
        Assert.Equal(3, root.GetProperty("frames").GetInt32());
        Assert.Equal(4, root.GetProperty("truth_lanes").GetInt32());
        Assert.Equal(3, root.GetProperty("pred_lanes").GetInt32());
        JsonElement iou = root.GetProperty("iou_f1");
        Assert.Equal(30, iou.GetProperty("width_px").GetInt32());
        JsonElement half = iou.GetProperty("thresholds").GetProperty("0.50");
        Assert.Equal((1, 2, 3), (half.GetProperty("tp").GetInt32(), half.GetProperty("fp").GetInt32(), half.GetProperty("fn").GetInt32()));
        Assert.Equal(2.0 / 7, half.GetProperty("f1").GetDouble(), 12);
        JsonElement low = iou.GetProperty("thresholds").GetProperty("0.10");
        Assert.Equal(4.0 / 7, low.GetProperty("f1").GetDouble(), 12);
        Assert.Equal(2.0 / 7, iou.GetProperty("mf1").GetDouble(), 12); // one TP (IoU 1) at every mF1 threshold
        JsonElement pa = root.GetProperty("point_accuracy");
        Assert.Equal(0.5, pa.GetProperty("accuracy").GetDouble(), 12);
        Assert.Equal(1.0 / 3, pa.GetProperty("fp_rate").GetDouble(), 12);
        Assert.Equal(0.5, pa.GetProperty("fn_rate").GetDouble(), 12);
        Assert.Equal(30.0, pa.GetProperty("tolerance_px").GetDouble()); // 20 px x 1920 / 1280
        Assert.Equal(2, root.GetProperty("by_tag").GetProperty("dusk").GetProperty("frames").GetInt32());
        JsonElement ci = root.GetProperty("intervals").GetProperty("f1@0.50");
        Assert.True(ci[0].GetDouble() <= ci[1].GetDouble());

        string[] rows = File.ReadAllLines(csv);
        Assert.Equal("frame,tags,tp,fp,fn,mean_matched_iou,point_accuracy", rows[0]);
        Assert.Equal("b.png,dusk,1,1,1,1,0.5", rows[2]);
        Assert.Equal("c.png,dusk;curve,0,0,1,,0", rows[3]);
    }

    [Fact]
    public void Score_SameInputs_ByteIdenticalJsonWhateverThreads()
    {
        (string truth, string pred) = WriteHandSet();
        string j1 = dir.File("1.json"), j2 = dir.File("2.json");
        Assert.Equal(0, CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--json", j1, "--threads", "1").Exit);
        Assert.Equal(0, CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--json", j2, "--threads", "2").Exit);
        Assert.Equal(File.ReadAllBytes(j1), File.ReadAllBytes(j2));
    }

    [Fact]
    public void Score_SeveralSystems_WritesSystemsAndPairedDifference()
    {
        (string truth, string pred) = WriteHandSet();
        string json = dir.File("m.json");
        (int exit, string stdout, _) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", "net=" + pred, "--pred", "oracle=" + truth, "--json", json, "--bootstrap", "50");
        Assert.Equal(0, exit);
        Assert.Contains("net - oracle", stdout, StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        JsonElement systems = doc.RootElement.GetProperty("systems");
        Assert.Equal(1.0, systems.GetProperty("oracle").GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50").GetProperty("f1").GetDouble());
        JsonElement diff = doc.RootElement.GetProperty("paired").GetProperty("net - oracle").GetProperty("f1@0.50");
        Assert.Equal((2.0 / 7) - 1.0, diff.GetProperty("diff").GetDouble(), 12);
    }

    [Fact]
    public void Score_GateBelowThreshold_Exits4WithReason()
    {
        (string truth, string pred) = WriteHandSet();
        (int exit, _, string stderr) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--min-f1", "0.5", "--bootstrap", "0");
        Assert.Equal(4, exit);
        Assert.Contains("quality gate failed", stderr, StringComparison.Ordinal);
        Assert.Equal(0, CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--min-f1", "0.25", "--bootstrap", "0").Exit);
    }

    // Source: docs/metrics.md, "no truth and no prediction at all: P = R = F1 = mF1 = 1, accuracy 1, rates 0
    // (and say so on stderr)".
    [Fact]
    public void Score_AllEmpty_ScoresOne_AndSaysSo()
    {
        string truth = dir.File("t.lanes.jsonl"), pred = dir.File("p.lanes.jsonl"), json = dir.File("e.json");
        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 1280, 720)]);
        Lanes.WriteFile(pred, [Lanes.Pred("a.png")]);
        (int exit, _, string stderr) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--json", json);
        Assert.Equal(0, exit);
        Assert.Contains("scores 1.0", stderr, StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        Assert.Equal(1.0, doc.RootElement.GetProperty("iou_f1").GetProperty("mf1").GetDouble());
        Assert.Equal(1.0, doc.RootElement.GetProperty("point_accuracy").GetProperty("accuracy").GetDouble());
        Assert.Equal(0.0, doc.RootElement.GetProperty("point_accuracy").GetProperty("fp_rate").GetDouble());
    }

    // Source: docs/metrics.md: frames of mixed sizes set width and tolerance per frame; width_px and tolerance_px
    // are then null. Here each frame's prediction equals its truth, so everything scores 1 at per-frame widths.
    [Fact]
    public void Score_MixedSizes_NullWidthAndTolerance()
    {
        string truth = dir.File("t.lanes.jsonl"), pred = dir.File("p.lanes.jsonl"), json = dir.File("x.json");
        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 1920, 1080, Lanes.Vertical(300, 1080)), Lanes.Truth("b.png", 1280, 720, Lanes.Vertical(300, 720))]);
        Lanes.WriteFile(pred, [Lanes.Pred("a.png", Lanes.Vertical(300, 1080)), Lanes.Pred("b.png", Lanes.Vertical(300, 720))]);
        // no --lane-width-px here: the width follows each frame's own size, so no single width_px exists
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", json).Exit);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("iou_f1").GetProperty("width_px").ValueKind);
        Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("point_accuracy").GetProperty("tolerance_px").ValueKind);
        Assert.Equal(1.0, doc.RootElement.GetProperty("iou_f1").GetProperty("mf1").GetDouble());
    }

    public static TheoryData<string, string, string> BadPredictions => new()
    {
        { "truncated", "{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2],", "p.lanes.jsonl:1: lanes[0].points[1]: invalid JSON" },
        { "nan", "{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2],[NaN,3]]}]}", "p.lanes.jsonl:1: lanes[0].points[1]: invalid JSON" },
        { "one-point", "{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2]]}]}", "p.lanes.jsonl:1: lanes[0].points: a lane needs at least 2 points" },
        { "duplicate", "{\"frame\":\"a.png\",\"lanes\":[]}\n{\"frame\":\"a.png\",\"lanes\":[]}", "p.lanes.jsonl:2: frame: duplicate frame 'a.png'" },
        { "not-in-truth", "{\"frame\":\"zzz.png\",\"lanes\":[]}", "p.lanes.jsonl:1: frame: frame 'zzz.png' is not in the truth file" },
        { "size-mismatch", "{\"frame\":\"a.png\",\"width\":1280,\"height\":590,\"lanes\":[]}", "p.lanes.jsonl:1: width: prediction width 1280 differs" },
        { "out-of-range", "{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2],[5000,3]]}]}", "p.lanes.jsonl:1: lanes[0].points[1]: point (5000, 3) is outside" },
    };

    // Source: CLI contract: bad input exits 3 with a message naming file, line and key, and no partial --json/--csv.
    // (--extra error: a frame the truth lacks is bad input only when asked; docs/score.md.)
    [Theory]
    [MemberData(nameof(BadPredictions))]
    public void Score_BadPrediction_Exits3_NamesFileLineKey_WritesNothing(string name, string content, string expected)
    {
        (string truth, _) = WriteHandSet();
        string pred = dir.File("p.lanes.jsonl"), json = dir.File(name + ".json"), csv = dir.File(name + ".csv");
        File.WriteAllText(pred, content);
        (int exit, _, string stderr) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--json", json, "--csv", csv, "--extra", "error");
        Assert.Equal(3, exit);
        Assert.Contains(expected, stderr, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", stderr, StringComparison.Ordinal);
        Assert.False(File.Exists(json));
        Assert.False(File.Exists(csv));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));
    }

    // Source: docs/metrics.md, "A frame missing from the predictions predicts no lanes": a prediction file with no records
    // scores every frame as empty (TP 0, all truth lanes missed), with a note, rather than failing.
    [Fact]
    public void Score_EmptyPredictionFile_ScoresNoLanes_WithANote()
    {
        (string truth, _) = WriteHandSet();
        string pred = dir.File("empty.lanes.jsonl"), json = dir.File("empty.json");
        File.WriteAllText(pred, string.Empty);
        (int exit, _, string err) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, "--json", json, "--bootstrap", "0");
        Assert.True(exit == 0, err);
        Assert.Contains("note: " + pred + ": the prediction file holds no records", err, StringComparison.Ordinal);
        using var doc = System.Text.Json.JsonDocument.Parse(File.ReadAllText(json));
        System.Text.Json.JsonElement half = doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50");
        Assert.Equal(0, half.GetProperty("tp").GetInt32());
        Assert.Equal(0, half.GetProperty("fp").GetInt32());
        Assert.True(half.GetProperty("fn").GetInt32() > 0);
        Assert.Equal(0, half.GetProperty("f1").GetDouble());
    }

    [Fact]
    public void Score_MissingFile_DirectoryAndNonUtf8_Exit3()
    {
        (string truth, string pred) = WriteHandSet();
        Assert.Contains("file not found", CliRunner.Run("score", "--truth", dir.File("nope.jsonl"), "--pred", pred).Err, StringComparison.Ordinal);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", dir.Path, "--pred", pred);
        Assert.Equal(3, exit);
        Assert.Contains("is a directory", err, StringComparison.Ordinal);
        string bad = dir.File("bad.jsonl");
        File.WriteAllBytes(bad, [.. "{\"frame\":\"a"u8.ToArray(), 0xFF, .. "\",\"lanes\":[]}\n"u8.ToArray()]);
        (exit, _, err) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", bad);
        Assert.Equal(3, exit);
        Assert.Contains("bad.jsonl:1: the line is not valid UTF-8 text", err, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("--iou", "1.7")]
    [InlineData("--lane-width-px", "0")]
    [InlineData("--bootstrap", "-1")]
    [InlineData("--nonsense", "1")]
    public void Score_BadOption_Exits2(string option, string value)
    {
        (string truth, string pred) = WriteHandSet();
        Assert.Equal(2, CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", pred, option, value).Exit);
    }

    private (string Truth, string Pred) WriteHandSet()
    {
        string truth = dir.File("truth.lanes.jsonl"), pred = dir.File("pred.lanes.jsonl");
        if (!File.Exists(truth))
        {
            Lanes.WriteFile(truth,
            [
                Tagged(Lanes.Truth("a.png", 1920, 1080, Lanes.Vertical(400, 1080)), "day"),
                Tagged(Lanes.Truth("b.png", 1920, 1080, Lanes.Vertical(400, 1080), Lanes.Vertical(1000, 1080)), "dusk"),
                Tagged(Lanes.Truth("c.png", 1920, 1080, Lanes.Vertical(700, 1080)), "dusk", "curve"),
            ]);
            Lanes.WriteFile(pred, [Lanes.Pred("a.png", Lanes.Vertical(415, 1080)), Lanes.Pred("b.png", Lanes.Vertical(400, 1080), Lanes.Vertical(1300, 1080))]);
        }

        return (truth, pred);
    }

    private static LaneRecord Tagged(LaneRecord r, params string[] tags) =>
        new() { Frame = r.Frame, Width = r.Width, Height = r.Height, Lanes = r.Lanes, Tags = tags };
}
