using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class ScoreMaskTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    private string WriteTruth()
    {
        string path = dir.File("t.lanes.jsonl");
        Lanes.WriteFile(path,
        [
            Lanes.Truth("a.jpg", 1920, 1080, Lanes.Of((400, 589), (700, 250)), Lanes.Of((1300, 589), (900, 250))),
            Lanes.Truth("b.jpg", 1920, 1080, Lanes.Of((820, 589), (822, 100))),
        ]);
        return path;
    }

    [Fact]
    public void MaskDrawnFromTheLaneFile_ScoresAboutOne()
    {
        string truth = WriteTruth(), masks = dir.File("pred"), json = dir.File("s.json");
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", masks).Exit);
        (int exit, _, string err) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", masks, "--json", json, "--bootstrap", "0");
        Assert.True(exit == 0, err);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        JsonElement half = doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50");
        Assert.Equal(1.0, half.GetProperty("f1").GetDouble());
        // Round caps add up to w/2 px at each end, so IoU is just below 1; mF1 reaches the 0.85 threshold at least.
        Assert.True(doc.RootElement.GetProperty("iou_f1").GetProperty("mf1").GetDouble() >= 0.8);
        Assert.Equal(1.0, doc.RootElement.GetProperty("point_accuracy").GetProperty("accuracy").GetDouble());
    }

    // Merge contract (docs/scaling.md): shards of mask folders merge to exactly the unsharded output, mask IoU (JSON,
    // table, per-lane CSV) included — the states carry each frame's per-lane mask IoU, replayed in the unsharded order.
    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    public void Partial_WithMaskFolders_MergesToTheUnshardedOutput(int n)
    {
        string truthLanes = dir.File("many.lanes.jsonl"), predLanes = dir.File("many-pred.lanes.jsonl");
        var truth = new List<Core.LaneFiles.LaneRecord>();
        var pred = new List<Core.LaneFiles.LaneRecord>();
        for (int i = 0; i < 9; i++)
        {
            string key = $"d{i % 2}/f{i}.jpg";
            truth.Add(Lanes.Truth(key, 320, 180, Lanes.Of((60 + i, 179), (140, 60)), Lanes.Of((260 - i, 179), (180, 60))));
            pred.Add(Lanes.Truth(key, 320, 180, [.. new[] { Lanes.Of((64 + (2 * i), 179), (141, 60)), Lanes.Of((200, 179), (200, 60)) }.Take(1 + (i % 2))]));
        }

        Lanes.WriteFile(truthLanes, truth);
        Lanes.WriteFile(predLanes, pred);
        string tm = dir.File("tm"), pm = dir.File("pm");
        Assert.Equal(0, CliRunner.Run("convert", truthLanes, "-o", tm).Exit);
        Assert.Equal(0, CliRunner.Run("convert", predLanes, "-o", pm).Exit);
        string[] common = ["score", "--lane-width-px", "30", "--truth", tm, "--pred", pm, "--bootstrap", "20"];
        (int exit, string fullOut, string err) = CliRunner.Run([.. common, "--json", dir.File("full.json"), "--mask-iou-csv", dir.File("full-mask.csv")]);
        Assert.True(exit == 0, err);
        Assert.Contains("\"mask_iou\"", File.ReadAllText(dir.File("full.json")), StringComparison.Ordinal);
        var states = new List<string>();
        for (int k = 0; k < n; k++)
        {
            states.Add(dir.File($"m{k}.state"));
            (exit, _, err) = CliRunner.Run([.. common, "--shard", $"{k}/{n}", "--partial", states[k]]);
            Assert.True(exit == 0, err);
        }

        (exit, string mergedOut, err) = CliRunner.Run(["merge", .. states, "-o", dir.File("merged.json"), "--mask-iou-csv", dir.File("merged-mask.csv")]);
        Assert.True(exit == 0, err);
        Assert.Equal(fullOut, mergedOut);
        Assert.Equal(File.ReadAllBytes(dir.File("full.json")), File.ReadAllBytes(dir.File("merged.json")));
        Assert.Equal(File.ReadAllBytes(dir.File("full-mask.csv")), File.ReadAllBytes(dir.File("merged-mask.csv")));
    }

    // Two frame keys with one mask path ('a.jpg', 'a.png' -> a.png) would overwrite each other: bad input naming both.
    [Fact]
    public void Convert_TwoFramesToOneMaskPath_Exits3NamingBoth()
    {
        string lanes = dir.File("clash.lanes.jsonl");
        Lanes.WriteFile(lanes, [Lanes.Truth("a.jpg", 64, 48, Lanes.Vertical(10, 48)), Lanes.Truth("a.png", 64, 48)]);
        (int exit, _, string err) = CliRunner.Run("convert", lanes, "-o", dir.File("cm"));
        Assert.Equal(3, exit);
        Assert.Contains("clash.lanes.jsonl:2: frame: frame 'a.png' maps to the same mask a.png as frame 'a.jpg' (line 1)", err, StringComparison.Ordinal);
    }

    [Fact]
    public void BothMasks_ReportMeanMaskIou_AndPerLaneCsv()
    {
        string truth = WriteTruth(), tm = dir.File("tm"), pm = dir.File("pm"), json = dir.File("s.json"), csv = dir.File("m.csv");
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", tm).Exit);
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", pm).Exit);
        (int exit, string stdout, string err) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", tm, "--pred", pm, "--json", json, "--mask-iou-csv", csv, "--bootstrap", "0");
        Assert.True(exit == 0, err);
        Assert.Contains("mean IoU 1.0000 over 3 truth lanes", stdout, StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        Assert.Equal(1.0, doc.RootElement.GetProperty("mask_iou").GetProperty("mean_iou").GetDouble());
        Assert.Matches("\"mean_iou\": ?1\\.0\\b", File.ReadAllText(json)); // docs/metrics.md: metrics are floats (1.0, not 1)
        string[] rows = File.ReadAllLines(csv);
        Assert.Equal("frame,truth_id,pred_id,iou", rows[0]);
        Assert.Equal("a.png,1,1,1", rows[1]);
        Assert.Equal(4, rows.Length);
    }

    [Fact]
    public void OneLaneMissingFromThePredictionMask_HalvesThatFramesMeanIou()
    {
        // Hand count: truth a.png has 2 lanes, b.png 1; the prediction drops a.png's second lane.
        // Per truth lane IoU: 1, 0 (unassigned), 1 -> mean 2/3.
        string truth = WriteTruth(), tm = dir.File("tm"), pm = dir.File("pm"), json = dir.File("s.json");
        string pred = dir.File("p.lanes.jsonl");
        Lanes.WriteFile(pred,
        [
            Lanes.Truth("a.jpg", 1920, 1080, Lanes.Of((400, 589), (700, 250))),
            Lanes.Truth("b.jpg", 1920, 1080, Lanes.Of((820, 589), (822, 100))),
        ]);
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", tm).Exit);
        Assert.Equal(0, CliRunner.Run("convert", pred, "-o", pm).Exit);
        Assert.Equal(0, CliRunner.Run("score", "--lane-width-px", "30", "--truth", tm, "--pred", pm, "--json", json, "--bootstrap", "0").Exit);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        Assert.Equal(2.0 / 3.0, doc.RootElement.GetProperty("mask_iou").GetProperty("mean_iou").GetDouble(), 12);
    }

    [Fact]
    public void FolderWithoutMasks_IsExit3_AndMaskIouCsvNeedsMasks_IsExit2()
    {
        string truth = WriteTruth();
        Directory.CreateDirectory(dir.File("none"));
        (int exit, _, string err) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", dir.File("none"));
        Assert.Equal(3, exit);
        Assert.Contains("is a directory with no mask PNGs", err, StringComparison.Ordinal);
        Assert.Equal(2, CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", truth, "--mask-iou-csv", dir.File("x.csv")).Exit);
    }

    [Fact]
    public void PredictionMaskForAnUnknownFrame_IsExit3()
    {
        string truth = WriteTruth(), masks = dir.File("pred");
        string other = dir.File("o.lanes.jsonl");
        Lanes.WriteFile(other, [Lanes.Truth("zzz.jpg", 1920, 1080, Lanes.Of((400, 589), (700, 250)))]);
        Assert.Equal(0, CliRunner.Run("convert", other, "-o", masks).Exit);
        (int exit, _, string err) = CliRunner.Run("score", "--lane-width-px", "30", "--truth", truth, "--pred", masks, "--extra", "error");
        Assert.Equal(3, exit);
        Assert.Contains("frame 'zzz.png' is not in the truth file", err, StringComparison.Ordinal);
    }
}
