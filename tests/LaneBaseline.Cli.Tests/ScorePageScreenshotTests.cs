using System.Buffers.Binary;
using LaneBaseline.Reporting;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// The page of <c>score --report</c> (built in memory) on the rendered sample set, loaded in headless Chromium: the
/// DOM holds the verdict, the road-plane section and the regression thumbnails, and the screenshot shows the page's
/// own colours (the first two system colours of <see cref="Palette"/> in the charts and swatches, the truth colour in
/// the thumbnails). Set LANEBASELINE_KEEP_SCREENSHOT=FILE to keep the screenshot and the page for a look.
/// </summary>
public sealed class ScorePageScreenshotTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [ChromiumFact]
    public void ScorePage_InChromium_HasVerdictRoadPlaneAndRegressions_AndItsPaletteColours()
    {
        (string baseline, string net, _) = ScorePageScenarioTests.WriteSystems(dir);
        string samples = ScorePageScenarioTests.Samples;
        string page = dir.File("page.html"), shot = dir.File("shot.png");
        (int exit, _, string err) = CliRunner.Run(
            "score", "--truth", Path.Combine(samples, "truth.lanes.jsonl"), "--pred", "baseline=" + baseline, "--pred", "net=" + net,
            "--camera", Path.Combine(samples, "camera.json"), "--report", page, "--frames", samples, "--bootstrap", "200");
        Assert.True(exit == 0, err);

        (int code, string dom, string chromeErr) = HeadlessChromium.Run(page, "--dump-dom");
        Assert.True(code == 0, chromeErr);
        Assert.Matches("<p id=\"verdict\" class=\"verdict\">Verdict, net against baseline: F1@0.50: net is worse", dom);
        Assert.Contains("<table id=\"ground-table\">", dom, StringComparison.Ordinal);
        Assert.Matches("<figure class=\"chart\" id=\"chart-ground\"><svg[^>]*viewBox=", dom);
        Assert.True(System.Text.RegularExpressions.Regex.Count(dom, "<figure class=\"thumb\" data-frame=\"[^\"]*\" data-delta=") == 8);

        (code, _, chromeErr) = HeadlessChromium.Run(page, "--screenshot=" + shot, "--window-size=1280,2000", "--hide-scrollbars");
        Assert.True(code == 0, chromeErr);
        byte[] png = File.ReadAllBytes(shot);
        // Source: PNG specification (W3C, 2003), sections 5.2 and 11.2.2: signature, then IHDR width and height.
        Assert.Equal(new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }, png[..8]);
        Assert.Equal(1280, BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(16, 4)));
        Assert.Equal(2000, BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(20, 4)));

        // common practice: the charts of the first screen draw each system in its palette colour; count pixels within
        // a small distance of each (antialiasing blends the edges, the line cores keep the colour).
        using Mat img = Cv2.ImDecode(png, ImreadModes.Color);
        foreach (string hex in Palette.Systems.Take(2))
        {
            Assert.True(Near(img, hex) > 500, $"the screenshot shows too little of the system colour {hex}");
        }

        if (Environment.GetEnvironmentVariable("LANEBASELINE_KEEP_SCREENSHOT") is { Length: > 0 } keep)
        {
            File.Copy(shot, keep, overwrite: true);
            File.Copy(page, Path.ChangeExtension(keep, ".html"), overwrite: true);
        }
    }

    private static int Near(Mat bgr, string hex)
    {
        (byte r, byte g, byte b) = OverlayColors.Rgb(hex);
        using Mat mask = new();
        Cv2.InRange(bgr, new Scalar(Math.Max(0, b - 12), Math.Max(0, g - 12), Math.Max(0, r - 12)), new Scalar(Math.Min(255, b + 12), Math.Min(255, g + 12), Math.Min(255, r + 12)), mask);
        return Cv2.CountNonZero(mask);
    }
}
