using System.Text.Json;
using Xunit;

namespace LaneBaseline.Cli.Tests.Detect;

/// <summary><c>detect --camera</c> end to end: metric bird's-eye view, scored against the rendered truth.</summary>
public sealed class DetectCameraTests : IDisposable
{
    private readonly string dir = Path.Combine(Path.GetTempPath(), "lb-cam-" + Guid.NewGuid().ToString("N"));

    public DetectCameraTests()
    {
        Directory.CreateDirectory(dir);
    }

    public void Dispose() => Directory.Delete(dir, recursive: true);

    [Fact]
    public void RenderDetectWithCameraScore_ScoresAtLeastAsWellAsWithout()
    {
        // End to end through render, detect and score: rendered frames carry exact truth and the camera they were
        // rendered through (camera.json). With that camera the bird's-eye view is metric and lane widths are limited
        // to 2.5-4.5 m; the camera run must score at least the F1@0.50 of the run without it (common practice in the
        // lane-detection literature, docs/metrics.md: IoU >= 0.5 of rasterised lanes). Clean and every condition once.
        string scenes = Path.Combine(dir, "scenes");
        Assert.Equal(0, CliRunner.Run("render", "-o", scenes, "--seed", "41", "--count", "15", "--size", "640x360").Exit);
        string truth = Path.Combine(scenes, "truth.lanes.jsonl"), camera = Path.Combine(scenes, "camera.json");
        string plain = Path.Combine(dir, "plain.lanes.jsonl"), metric = Path.Combine(dir, "metric.lanes.jsonl");

        Assert.Equal(0, CliRunner.Run("detect", "--frames", scenes, "-o", plain).Exit);
        (int exit, _, string err) = CliRunner.Run("detect", "--frames", scenes, "--camera", camera, "-o", metric);
        Assert.True(exit == 0, err);

        double f1Plain = F1(truth, plain), f1Metric = F1(truth, metric);
        Assert.True(f1Metric >= f1Plain, $"F1@0.50 with camera {f1Metric} < without {f1Plain}");
        Assert.True(f1Metric >= 0.7, $"F1@0.50 with camera {f1Metric}");

        // The effective configuration written beside the lanes states the metric section the run used.
        string config = File.ReadAllText(Path.Combine(dir, "metric.config.yaml"));
        Assert.Contains("metric:\n  metresPerPx: 0.05\n", config, StringComparison.Ordinal);
        Assert.DoesNotContain("metric:", File.ReadAllText(Path.Combine(dir, "plain.config.yaml")), StringComparison.Ordinal);
    }

    [Fact]
    public void MetricSectionOutOfRange_IsBadInput_Exit3_NamingFileLineAndKey()
    {
        // Source: DEVELOPERS.md, "Errors and exit codes": bad input exits 3 with FILE:LINE: key: problem and no output.
        string preset = Path.Combine(dir, "p.yaml"), output = Path.Combine(dir, "x.lanes.jsonl");
        File.WriteAllText(preset, "metric:\n  nearDistanceM: 30\n  farDistanceM: 20\n");
        string frames = Path.Combine(dir, "f");
        Assert.Equal(0, CliRunner.Run("render", "-o", frames, "--count", "1", "--size", "320x180").Exit);
        (int exit, _, string err) = CliRunner.Run("detect", "--frames", frames, "--camera", Path.Combine(frames, "camera.json"), "-c", preset, "-o", output);
        Assert.Equal(3, exit);
        Assert.Contains("p.yaml:2: metric.nearDistanceM", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    private double F1(string truth, string pred)
    {
        string json = Path.Combine(dir, Path.GetFileNameWithoutExtension(pred) + ".score.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", json, "--bootstrap", "0").Exit);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        return doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50").GetProperty("f1").GetDouble();
    }
}
