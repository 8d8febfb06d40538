using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core.Calibration;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>Rendered stills of every condition in turn (the default mix) with exact truth, made once for the class.</summary>
public sealed class MixedFrames : IDisposable
{
    public MixedFrames()
    {
        (int exit, _, string err) = CliRunner.Run(
            "render", "--out", Dir.Path, "--seed", "23", "--count", "22", "--size", "640x360", "--format", "png", "--threads", "2");
        Assert.True(exit == 0, err);
    }

    public TempDir Dir { get; } = new();

    public string Truth => Dir.File("truth.lanes.jsonl");

    public void Dispose() => Dir.Dispose();
}

public sealed class CalibrationCommandTests : IClassFixture<MixedFrames>, IDisposable
{
    private readonly MixedFrames frames;
    private readonly TempDir work = new();

    public CalibrationCommandTests(MixedFrames frames)
    {
        this.frames = frames;
    }

    public void Dispose() => work.Dispose();

    // The default preset without its calibration section: the raw confidences the fit starts from.
    private string Uncalibrated()
    {
        string text = KnownPresets.GetText("default");
        string path = work.File("raw.yaml");
        File.WriteAllText(path, text[..text.IndexOf("\ncalibration:", StringComparison.Ordinal)] + "\n");
        return path;
    }

    [Fact]
    public void TuneCalibrate_FitsOnTheScorersOutcomes_IsThreadIndependent_AndWritesALoadablePreset()
    {
        string raw = Uncalibrated();
        string one = work.File("one.yaml"), two = work.File("two.yaml");
        (int exit, string stdout, string err) = CliRunner.Run("tune", "--calibrate", "--frames", frames.Dir.Path, "--truth", frames.Truth, "--config", raw, "-o", one, "--threads", "1");
        Assert.True(exit == 0, err);
        Assert.Contains("calibration: ", stdout, StringComparison.Ordinal);
        Assert.Equal(0, CliRunner.Run("tune", "--calibrate", "--frames", frames.Dir.Path, "--truth", frames.Truth, "--config", raw, "-o", two, "--threads", "2").Exit);
        Assert.Equal(File.ReadAllBytes(one), File.ReadAllBytes(two)); // rules: same inputs, same bytes, whatever --threads

        CalibrationOptions c = PresetLoader.LoadFile(one).Calibration!;
        Assert.NotNull(c);

        // Outside the fit: `detect` with the raw preset and `score` count the same lanes and the same true positives
        // at IoU 0.50 as the fit saw (one matching, the scorer's own).
        string lanes = work.File("raw.lanes.jsonl"), json = work.File("raw.json");
        Assert.Equal(0, CliRunner.Run("detect", frames.Dir.Path, "-o", lanes, "--config", raw).Exit);
        Assert.Equal(0, CliRunner.Run("score", "--truth", frames.Truth, "--pred", lanes, "--json", json).Exit);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        JsonElement half = doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50");
        Assert.Equal(doc.RootElement.GetProperty("pred_lanes").GetInt32(), c.FittedLanes);
        Assert.Equal(half.GetProperty("tp").GetInt32(), c.FittedPositives);

        // The calibrated preset runs, and every reported score is one of the mapping's probabilities (>= minScore).
        string calibrated = work.File("cal.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("detect", frames.Dir.Path, "-o", calibrated, "--config", one).Exit);
        using var reader = LaneFileReader.Open(calibrated, sizeRequired: true);
        foreach (LaneRecord r in reader.ReadAll())
        {
            Assert.All(r.Lanes, l => Assert.InRange(l.Score!.Value, 0.15, 1));
        }
    }

    [Fact]
    public void TuneCalibrate_CalibrationTable_HasOneRowPerLane_WithTheScorersOutcome_AndTheFittedScore()
    {
        string raw = Uncalibrated();
        string preset = work.File("t.yaml"), table = work.File("lanes.csv");
        (int exit, _, string err) = CliRunner.Run("tune", "--calibrate", "--frames", frames.Dir.Path, "--truth", frames.Truth, "--config", raw, "-o", preset, "--calibration-table", table);
        Assert.True(exit == 0, err);
        string[] lines = File.ReadAllLines(table);
        string[] header = lines[0].Split(',');
        Assert.Equal(["frame", "lane", "hit", .. LaneFeatures.Names, "score"], header);
        string[][] rows = [.. lines.Skip(1).Select(l => l.Split(','))];
        Assert.All(rows, r => Assert.Equal(header.Length, r.Length));

        // The same lanes and true positives the fit counted (the scorer's matching at IoU 0.50).
        CalibrationOptions c = PresetLoader.LoadFile(preset).Calibration!;
        Assert.Equal(c.FittedLanes, rows.Length);
        Assert.Equal(c.FittedPositives, rows.Count(r => r[2] == "1"));

        // The score column is the fitted mapping applied to the row's features (re-derived here from the stored preset).
        var mapping = new LaneCalibration(c);
        foreach (string[] r in rows.Take(20))
        {
            double[] values = [.. c.Features.Select(f => double.Parse(r[Array.IndexOf(header, f)], CultureInfo.InvariantCulture))];
            Assert.Equal(mapping.FromFeatures(values), double.Parse(r[^1], CultureInfo.InvariantCulture), 12);
        }

        // '-' writes the same table to standard output, which then holds nothing else (the summary goes to stderr).
        (int exitPipe, string stdout, string errPipe) = CliRunner.Run("tune", "--calibrate", "--frames", frames.Dir.Path, "--truth", frames.Truth, "--config", raw, "-o", work.File("t2.yaml"), "--calibration-table", "-");
        Assert.True(exitPipe == 0, errPipe);
        Assert.Equal(File.ReadAllText(table), stdout);
        Assert.Contains("calibration: ", errPipe, StringComparison.Ordinal);

        // Without --calibrate the option is a usage error.
        Assert.Equal(2, CliRunner.Run("tune", "--frames", frames.Dir.Path, "--truth", frames.Truth, "-o", work.File("x.yaml"), "--calibration-table", work.File("y.csv")).Exit);
    }

    [Fact]
    public void TuneCalibrate_ReplacesAnExistingSection_KeepingTheRestOfThePresetText()
    {
        string preset = work.File("p.yaml");
        File.WriteAllText(preset, KnownPresets.GetText("default")); // already calibrated
        (int exit, _, string err) = CliRunner.Run("tune", "--calibrate", "--frames", frames.Dir.Path, "--truth", frames.Truth, "--config", preset, "-o", preset, "--logistic-only");
        Assert.True(exit == 0, err);
        string text = File.ReadAllText(preset);
        Assert.Single(text.Split('\n'), l => l.StartsWith("calibration:", StringComparison.Ordinal));
        Assert.Contains("# process noise of the offset", text, StringComparison.Ordinal); // comments of other sections kept
        Assert.Empty(PresetLoader.LoadFile(preset).Calibration!.IsotonicX);
    }

    [Fact]
    public void Detect_WithACalibrationNamingAnUnknownFeature_Exits3NamingFileAndLine()
    {
        string preset = work.File("bad.yaml");
        File.WriteAllText(preset, "calibration:\n  features: [rawScore, futureContrast]\n  mean: [0, 0]\n  scale: [1, 1]\n  weights: [1, 1]\n");
        (int exit, _, string err) = CliRunner.Run("detect", frames.Dir.Path, "-o", work.File("x.lanes.jsonl"), "--config", preset);
        Assert.Equal(3, exit);
        Assert.Contains("bad.yaml:2: calibration.features: feature 'futureContrast' is not known to this build", err, StringComparison.Ordinal);
        Assert.False(File.Exists(work.File("x.lanes.jsonl")));
    }

    [Fact]
    public void Score_ReportsReliabilityEceAndBestThreshold_AndShardsMergeByteForByte()
    {
        // Hand-derived: per frame one truth lane at x = 100 (200x100 frame) and two predictions: one on it (IoU 1, a
        // true positive) with score 0.9, one at x = 170 (no overlap: a false positive) with score 0.7. Over 4 frames:
        // bin 9 holds 4 lanes, mean 0.9, precision 1 (gap 0.1); bin 7 holds 4, mean 0.7, precision 0 (gap 0.7).
        // ECE (Naeini et al. 2015) = (4·0.1 + 4·0.7) / 8 = 0.4. Best F1 over the score: t = 0.9 keeps the 4 true
        // positives of 4 truth lanes, F1 = 1.
        var t = new List<LaneRecord>();
        var p = new List<LaneRecord>();
        for (int i = 0; i < 4; i++)
        {
            string frame = $"drive/f{i}.png";
            t.Add(Lanes.Truth(frame, 200, 100, Lanes.Vertical(100, 100)));
            var hit = new Lane { Points = Lanes.Vertical(100, 100).Points, Score = 0.9 };
            var miss = new Lane { Points = Lanes.Vertical(170, 100).Points, Score = 0.7 };
            p.Add(Lanes.Pred(frame, hit, miss));
        }

        string truth = work.File("t.lanes.jsonl"), pred = work.File("p.lanes.jsonl");
        Lanes.WriteFile(truth, t);
        Lanes.WriteFile(pred, p);
        (int exit, string table, _) = CliRunner.Run("score", "--truth", truth, "--pred", "sys=" + pred, "--json", work.File("full.json"));
        Assert.Equal(0, exit);
        Assert.Contains("Calibration of score (sys): ECE 0.4000 over 8 scored lanes; best F1 1.0000 at score >= 0.9000", table, StringComparison.Ordinal);
        using (JsonDocument doc = JsonDocument.Parse(File.ReadAllText(work.File("full.json"))))
        {
            JsonElement cal = doc.RootElement.GetProperty("calibration");
            Assert.Equal(0.4, cal.GetProperty("ece").GetDouble(), 12);
            JsonElement[] bins = [.. cal.GetProperty("reliability").EnumerateArray()];
            Assert.Equal(10, bins.Length);
            Assert.Equal(4, bins[9].GetProperty("lanes").GetInt32());
            Assert.Equal(1.0, bins[9].GetProperty("precision").GetDouble());
            Assert.Equal(0.0, bins[7].GetProperty("precision").GetDouble());
            Assert.Equal(JsonValueKind.Null, bins[0].GetProperty("precision").ValueKind);
            Assert.Equal(0.9, cal.GetProperty("best_f1").GetProperty("min_score").GetDouble());
        }

        for (int k = 0; k < 3; k++)
        {
            Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", "sys=" + pred, "--shard", $"{k}/3", "--partial", work.File($"s{k}.state")).Exit);
        }

        (int mExit, string merged, _) = CliRunner.Run("merge", work.File("s0.state"), work.File("s1.state"), work.File("s2.state"), "-o", work.File("merged.json"));
        Assert.Equal(0, mExit);
        Assert.Equal(File.ReadAllBytes(work.File("full.json")), File.ReadAllBytes(work.File("merged.json")));
        Assert.Equal(table, merged);
    }
}
