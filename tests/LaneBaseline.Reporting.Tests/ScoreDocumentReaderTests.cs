using System.Text;
using LaneBaseline.Core;
using LaneBaseline.Reporting.Score;
using Xunit;

namespace LaneBaseline.Reporting.Tests;

public sealed class ScoreDocumentReaderTests
{
    private static ScoreDocument Parse(string json) => ScoreDocumentReader.Parse(Encoding.UTF8.GetBytes(json), "s.json");

    [Fact]
    public void Parse_TwoSystems_KeepsOrderValuesAndSettings()
    {
        ScoreDocument doc = Parse(HtmlReportWriterTests.TwoSystemsJson());
        Assert.Equal(["alpha", "beta"], doc.Systems.Select(s => s.Name));
        SystemResult a = doc.Systems[0];
        Assert.Equal(["0.10", "0.50", "0.75"], a.Overall.Thresholds.Select(t => t.Key));
        Assert.Equal(new DetectionSummary(6, 2, 4, 0.75, 0.6, 0.6666666666666666), a.Overall.At("0.50"));
        Assert.Equal(new Ci(0.4, 0.85), a.Intervals!.Get("f1@0.50"));
        Assert.Equal(7UL, a.Intervals.Seed);
        Assert.Equal(2, a.ConfidenceSweep.Count);
        Assert.Equal("night", Assert.Single(a.ByTag).Key);
        Assert.True(double.IsNaN(doc.Systems[1].Overall.Point.FpRate)); // null in the file
        Assert.Null(doc.Systems[1].Intervals);
        PairedResult p = Assert.Single(doc.Paired);
        Assert.Equal(("alpha", "beta"), (p.A, p.B));
        Assert.Equal(new Ci(-0.5, -0.05), p.Statistics[0].Ci95);
        Assert.Equal("a.lanes.jsonl", doc.Setting("predictions.alpha"));
        Assert.Equal("0.10, 0.50, 0.75", doc.Setting("iou_thresholds"));
        Assert.Equal("null", doc.Setting("lane_width_px"));
    }

    [Fact]
    public void Parse_SingleSystem_TakesNameFromSettings()
    {
        string json = """
            {"frames": 1, "truth_lanes": 0, "pred_lanes": 0,
             "iou_f1": {"width_px": null, "thresholds": {"0.50": {"tp": 0, "fp": 0, "fn": 0, "precision": 1.0, "recall": 1.0, "f1": 1.0}}, "mf1": 1.0},
             "point_accuracy": {"tolerance_px": null, "accuracy": 1.0, "fp_rate": 0.0, "fn_rate": 0.0, "matched": 0, "truth_lanes": 0, "pred_lanes": 0},
             "by_tag": {},
             "settings": {"truth": "t", "predictions": {"mine": "p"}}}
            """;
        ScoreDocument doc = Parse(json);
        SystemResult s = Assert.Single(doc.Systems);
        Assert.Equal("mine", s.Name);
        Assert.Null(s.Overall.WidthPx);
        Assert.Null(s.Overall.Point.TolerancePx);
        Assert.Empty(doc.Paired);
    }

    [Theory]
    [InlineData("{\n\"frames\": 1,\n\"iou_f1\": [}", "s.json:3: malformed JSON")]
    [InlineData("", "s.json:1: malformed JSON")]
    [InlineData("\"text\"", "s.json: (root): expected a JSON object, found a string")]
    [InlineData("{\"systems\": {}}", "s.json: systems: holds no system")]
    [InlineData("{\"frames\": 1, \"truth_lanes\": 1, \"pred_lanes\": 1, \"iou_f1\": {\"thresholds\": {\"0.50\": {\"tp\": -1}}}}", "s.json: (root).iou_f1.thresholds.0.50.tp: expected a whole number of 0 or more, found the number -1")]
    [InlineData("{\"frames\": 1, \"truth_lanes\": 1, \"pred_lanes\": 1, \"iou_f1\": {\"thresholds\": {\"half\": {}}}}", "s.json: (root).iou_f1.thresholds.half: a threshold key must be a number in (0, 1]")]
    [InlineData("{\"frames\": 1, \"truth_lanes\": 1, \"pred_lanes\": 1, \"iou_f1\": {\"thresholds\": {}}}", "s.json: (root).iou_f1.thresholds: holds no threshold")]
    public void Parse_BadInput_NamesFileAndPlace(string json, string expected)
    {
        var ex = Assert.Throws<BadInputException>(() => Parse(json));
        Assert.StartsWith(expected, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Read_MissingFileOrDirectory_BadInput()
    {
        string missing = Path.Combine(Path.GetTempPath(), "lanebaseline-" + Guid.NewGuid().ToString("N") + ".json");
        Assert.EndsWith("file not found", Assert.Throws<BadInputException>(() => ScoreDocumentReader.Read(missing)).Message, StringComparison.Ordinal);
        Assert.Contains("is a directory", Assert.Throws<BadInputException>(() => ScoreDocumentReader.Read(Path.GetTempPath())).Message, StringComparison.Ordinal);
    }
}
