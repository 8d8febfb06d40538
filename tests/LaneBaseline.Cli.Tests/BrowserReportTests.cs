using System.Buffers.Binary;
using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// Loads the report in a real browser (headless Chromium): the rendered DOM must hold every chart and table, and a
/// 1280x2400 screenshot must be produced. Set LANEBASELINE_KEEP_SCREENSHOT=FILE to keep the screenshot for a look.
/// </summary>
public sealed class BrowserReportTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [ChromiumFact]
    public void Chromium_LoadsReport_DomHasEveryChartAndTable_AndScreenshotIsAPicture()
    {
        var scene = new ReportScene(dir);
        string json = dir.File("s.json"), page = dir.File("report.html"), shot = dir.File("shot.png");
        Assert.Equal(0, CliRunner.Run("score", "--truth", scene.Truth, "--pred", "baseline=" + scene.Baseline, "--pred", "net=" + scene.Net, "--json", json, "--bootstrap", "100").Exit);
        string findings = dir.File("f.jsonl");
        Assert.Equal(0, CliRunner.Run("audit", "--pred", scene.Net, "-o", findings, "--size", "640x360", "--threads", "1").Exit);
        (int exit, _, string err) = CliRunner.Run("report", "--score", json, "--audit", findings, "-o", page, "--generated-at", "2026-01-31T12:00:00Z",
            "--frames", scene.Frames, "--truth", scene.Truth, "--pred", "baseline=" + scene.Baseline, "--pred", "net=" + scene.Net);
        Assert.True(exit == 0, err);
        string source = File.ReadAllText(page);

        (int code, string dom, string chromeErr) = HeadlessChromium.Run(page, "--dump-dom");
        Assert.True(code == 0, chromeErr);
        foreach (string chart in new[] { "chart-iou", "chart-confidence", "chart-tags", "chart-paired", "chart-audit" })
        {
            Assert.Matches($"<figure class=\"chart\" id=\"{chart}\"><svg[^>]*viewBox=", dom);
        }

        foreach (string table in new[] { "headline-table", "iou-table", "confidence-table", "tag-table", "paired-table", "audit-rules-table", "settings-table", "versions-table" })
        {
            Assert.Contains($"<table id=\"{table}\">", dom, StringComparison.Ordinal);
        }

        Assert.Equal(Regex.Count(source, "<img "), Regex.Count(dom, "<img "));
        Assert.True(Regex.Count(dom, "<img ") >= 2);

        (code, _, chromeErr) = HeadlessChromium.Run(page, "--screenshot=" + shot, "--window-size=1280,2400", "--hide-scrollbars");
        Assert.True(code == 0, chromeErr);
        byte[] png = File.ReadAllBytes(shot);

        // Source: PNG specification (W3C, 2003), sections 5.2 and 11.2.2: 8-byte signature, then IHDR with
        // big-endian width and height.
        Assert.Equal(new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }, png[..8]);
        Assert.Equal(1280, BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(16, 4)));
        Assert.Equal(2400, BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(20, 4)));

        // common practice: a page that rendered has ink on it; a blank or error page is one flat colour.
        using Mat img = Cv2.ImDecode(png, ImreadModes.Grayscale);
        Cv2.MeanStdDev(img, out Scalar _, out Scalar std);
        Assert.True(std.Val0 > 20, $"screenshot looks blank (grey std dev {std.Val0:0.0})");
        using Mat ink = new();
        Cv2.Threshold(img, ink, 128, 255, ThresholdTypes.BinaryInv);
        Assert.True(Cv2.CountNonZero(ink) > img.Width * img.Height / 50, "too little dark ink for a page of tables and charts");

        if (Environment.GetEnvironmentVariable("LANEBASELINE_KEEP_SCREENSHOT") is { Length: > 0 } keep)
        {
            File.Copy(shot, keep, overwrite: true);
            File.Copy(page, Path.ChangeExtension(keep, ".html"), overwrite: true);
        }
    }
}
