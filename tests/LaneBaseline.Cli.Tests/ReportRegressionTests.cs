using System.Text.RegularExpressions;
using LaneBaseline.Reporting;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>The page's verdict line and the Largest regressions gallery (network against baseline, frame by frame).</summary>
public sealed class ReportRegressionTests : IDisposable
{
    private const string FixedTime = "2026-01-31T12:00:00Z";
    private readonly TempDir dir = new();
    private readonly ReportScene scene;

    public ReportRegressionTests() => scene = new ReportScene(dir);

    public void Dispose() => dir.Dispose();

    // Hand-derived from ReportScene, with the roles swapped so the network is the weaker system: "net" is the scene's
    // baseline file, "baseline" the scene's net file. Frame F1 at IoU 0.50 (ReportCommandTests derives each):
    //   scene-baseline: f0 1, f1 0 (12 px shift, IoU ~0.2), f2 2/3 (one miss), f3 4/5 (one false line), f4 0, f5 1
    //   scene-net:      f0 1, f1 1, f2 1, f3 1, f4 1/2 (one line 8 px off: TP 1, FP 1, FN 1), f5 1
    // delta (net - baseline): f1 -1, f4 -1/2, f2 -1/3, f3 -1/5, f0 and f5 0 -> gallery order f1, f4, f2, f3; 4 worse, 0 better.
    [Fact]
    public void ScoreReport_RegressionGallery_RankedByDelta_DrawsMissesAndFalsePositivesApart_LinksFullSize()
    {
        string page = dir.File("out/check.html");
        (int exit, _, string err) = CliRunner.Run(
            "score", "--truth", scene.Truth, "--pred", "baseline=" + scene.Net, "--pred", "net=" + scene.Baseline,
            "--bootstrap", "200", "--threads", "1", "--report", page, "--frames", scene.Frames, "--json", dir.File("s.json"));
        Assert.True(exit == 0, err);
        string html = File.ReadAllText(page);
        string section = html[html.IndexOf("<section id=\"regressions\">", StringComparison.Ordinal)..html.IndexOf("<section id=\"gallery\">", StringComparison.Ordinal)];
        string[] order = [.. Regex.Matches(section, "data-frame=\"([^\"]+)\" data-delta=\"([^\"]+)\"").Select(m => m.Groups[1].Value + " " + m.Groups[2].Value)];
        Assert.Equal(4, order.Length);
        Assert.Equal(["clip/f1.png", "clip/f4.png", "clip/f2.png", "clip/f3.png"], order.Select(o => o.Split(' ')[0]));
        Assert.Equal(-1.0, double.Parse(order[0].Split(' ')[1], System.Globalization.CultureInfo.InvariantCulture), 12);
        Assert.Equal(-0.5, double.Parse(order[1].Split(' ')[1], System.Globalization.CultureInfo.InvariantCulture), 12);
        Assert.Contains("is worse than <strong>baseline</strong> on 4 frames, better on 0 frames, of 6 frames", section, StringComparison.Ordinal);
        Assert.Contains("id=\"regression-legend\"", section, StringComparison.Ordinal);

        // thumbnails link to full-size overlays written beside the page
        string[] links = [.. Regex.Matches(section, "<a href=\"([^\"]+)\"><img").Select(m => m.Groups[1].Value)];
        Assert.Equal(["check.frames/001_clip_f1.png", "check.frames/002_clip_f4.png", "check.frames/003_clip_f2.png", "check.frames/004_clip_f3.png"], links);
        foreach (string link in links)
        {
            using Mat full = Cv2.ImRead(Path.Combine(dir.File("out"), link));
            Assert.Equal((ReportScene.Width, ReportScene.Height), (full.Width, full.Height));
        }

        // f2: the right truth line is missed -> brick-red band; no false line. f3: a false line -> ochre dashes; no miss.
        using (Mat f2 = Cv2.ImRead(dir.File("out/check.frames/003_clip_f2.png")))
        using (Mat f3 = Cv2.ImRead(dir.File("out/check.frames/004_clip_f3.png")))
        {
            Assert.True(CountNear(f2, OverlayColors.MissHex) > 500, "f2 miss band");
            Assert.Equal(0, CountNear(f2, OverlayColors.FalsePositiveHex));
            Assert.True(CountNear(f3, OverlayColors.FalsePositiveHex) > 100, "f3 dashed false line");
            Assert.Equal(0, CountNear(f3, OverlayColors.MissHex));
            Assert.True(CountNear(f3, OverlayColors.PredictionHex) > 100, "f3 matching lines");
        }

        // the verdict names the network, the direction and whether the paired interval excludes 0
        Match verdict = Regex.Match(html, "<p id=\"verdict\" class=\"verdict\">([^<]+)</p>");
        Assert.True(verdict.Success);
        Assert.StartsWith("Verdict, net against baseline: F1@0.50: net is worse by", verdict.Groups[1].Value, StringComparison.Ordinal);
        Assert.Contains("point accuracy:", verdict.Groups[1].Value, StringComparison.Ordinal);
    }

    // issue: report --score S.json --frames DIR takes the truth and prediction paths recorded in the score file.
    [Fact]
    public void Report_FramesAlone_UsesPathsFromTheScoreFile()
    {
        string json = dir.File("s.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", scene.Truth, "--pred", "baseline=" + scene.Net, "--pred", "net=" + scene.Baseline, "--json", json, "--bootstrap", "100").Exit);
        string a = dir.File("a/page.html"), b = dir.File("b/page.html");
        Directory.CreateDirectory(dir.File("a"));
        Directory.CreateDirectory(dir.File("b"));
        (int exit, _, string err) = CliRunner.Run("report", "--score", json, "-o", a, "--frames", scene.Frames, "--generated-at", FixedTime);
        Assert.True(exit == 0, err);
        Assert.Equal(0, CliRunner.Run("report", "--score", json, "-o", b, "--frames", scene.Frames, "--generated-at", FixedTime,
            "--truth", scene.Truth, "--pred", "baseline=" + scene.Net, "--pred", "net=" + scene.Baseline).Exit);
        Assert.Equal(File.ReadAllText(b), File.ReadAllText(a));
        Assert.Contains("data-frame=\"clip/f1.png\" data-delta=\"-1\"", File.ReadAllText(a), StringComparison.Ordinal);
    }

    /// <summary>Pixels within a small distance of a palette colour (anti-aliased edges excluded by the tolerance).</summary>
    private static int CountNear(Mat image, string hex)
    {
        (byte r, byte g, byte b) = OverlayColors.Rgb(hex);
        int n = 0, rows = image.Rows, cols = image.Cols;
        for (int y = 0; y < rows; y++)
        {
            for (int x = 0; x < cols; x++)
            {
                Vec3b v = image.At<Vec3b>(y, x);
                if (Math.Abs(v.Item0 - b) + Math.Abs(v.Item1 - g) + Math.Abs(v.Item2 - r) < 24)
                {
                    n++;
                }
            }
        }

        return n;
    }
}
