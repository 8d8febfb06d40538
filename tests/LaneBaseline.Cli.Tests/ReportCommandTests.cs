using System.Globalization;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class ReportCommandTests : IDisposable
{
    private const string FixedTime = "2026-01-31T12:00:00Z";
    private readonly TempDir dir = new();
    private readonly ReportScene scene;

    public ReportCommandTests() => scene = new ReportScene(dir);

    public void Dispose() => dir.Dispose();

    private string ScoreTwo(string name = "two.json")
    {
        string json = dir.File(name);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", scene.Truth, "--pred", "baseline=" + scene.Baseline, "--pred", "net=" + scene.Net, "--json", json, "--bootstrap", "200", "--threads", "1");
        Assert.True(exit == 0, err);
        return json;
    }

    private (int Exit, string Err, string Html) Report(string json, string output, bool gallery = true)
    {
        var args = new List<string> { "report", "--score", json, "-o", output, "--generated-at", FixedTime };
        if (gallery)
        {
            args.AddRange(["--frames", scene.Frames, "--truth", scene.Truth, "--pred", "baseline=" + scene.Baseline, "--pred", "net=" + scene.Net]);
        }

        (int exit, _, string err) = CliRunner.Run([.. args]);
        return (exit, err, File.Exists(output) ? File.ReadAllText(output) : string.Empty);
    }

    // Source: the report's contract in docs/cli.md and issue 7: every section present, numbers equal to
    // the score JSON (checked here against the JSON file, the outside input of the page).
    [Fact]
    public void Report_TwoSystemsWithGallery_EverySectionAndNumbersMatchJson()
    {
        string json = ScoreTwo();
        (int exit, string err, string html) = Report(json, dir.File("r.html"));
        Assert.True(exit == 0, err);
        foreach (string id in new[] { "headline", "iou-curve", "confidence", "tags", "paired", "gallery", "tag-gallery", "configuration", "caution" })
        {
            Assert.Contains($"<section id=\"{id}\">", html, StringComparison.Ordinal);
        }

        foreach (string id in new[] { "chart-iou", "chart-confidence", "chart-tags", "chart-paired" })
        {
            Assert.Matches($"<figure class=\"chart\" id=\"{id}\"><svg ", html);
        }

        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        foreach (string sys in new[] { "baseline", "net" })
        {
            JsonElement s = doc.RootElement.GetProperty("systems").GetProperty(sys);
            string row = Row(html, "headline-table", sys);
            JsonElement half = s.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50");
            AssertCell(row, "f1@0.50", half.GetProperty("f1").GetDouble());
            AssertCell(row, "mf1", s.GetProperty("iou_f1").GetProperty("mf1").GetDouble());
            AssertCell(row, "accuracy", s.GetProperty("point_accuracy").GetProperty("accuracy").GetDouble());
            Assert.Contains($"<td data-key=\"frames\">{s.GetProperty("frames").GetInt32()}</td>", row, StringComparison.Ordinal);
            JsonElement ci = s.GetProperty("intervals").GetProperty("f1@0.50");
            Assert.Contains($"[{ci[0].GetDouble().ToString("0.000", CultureInfo.InvariantCulture)}, {ci[1].GetDouble().ToString("0.000", CultureInfo.InvariantCulture)}]", row, StringComparison.Ordinal);
            AssertCell(Row(html, "iou-table", sys), "0.75", s.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.75").GetProperty("f1").GetDouble());
        }

        JsonElement pair = doc.RootElement.GetProperty("paired").GetProperty("baseline - net").GetProperty("f1@0.50");
        Assert.Contains($"data-value=\"{pair.GetProperty("diff").GetDouble().ToString("R", CultureInfo.InvariantCulture)}\"", html, StringComparison.Ordinal);

        // Gallery, hand-derived from ReportScene (lines 12 px wide on 640 px frames, footprint 13 px):
        //  baseline f4: both lines shifted 45 px -> IoU 0, F1 0, point acc ~0 (worst);
        //  baseline f1: 12 px horizontal shift = 12*159/sqrt(150^2+159^2) = 8.7 px across the line -> IoU ~0.2 < 0.5,
        //               F1 0, but |dx| 12 < tolerance 10/cos(atan(150/159)) = 13.7 px -> point acc 1;
        //  baseline f2: 1 TP, 0 FP, 1 FN -> F1 2/3; f3: 2 TP, 1 FP, 0 FN -> F1 4/5; f0, f5 exact -> left out.
        //  net: only f4 is imperfect (8 px shift: 5.8 px across -> IoU (13-5.8)/(13+5.8) ~ 0.38 < 0.5 on one line).
        string[] shown = [.. Regex.Matches(html, "<figure class=\"thumb\" data-frame=\"([^\"]+)\" data-system=\"([^\"]+)\"")
            .Select(m => m.Groups[2].Value + ":" + m.Groups[1].Value)];
        Assert.Equal(["baseline:clip/f4.png", "baseline:clip/f1.png", "baseline:clip/f2.png", "baseline:clip/f3.png", "net:clip/f4.png"], shown);
        Assert.Contains("F1@0.50 0.667 (TP 1, FP 0, FN 1)", html, StringComparison.Ordinal);
        Assert.Contains("F1@0.50 0.800 (TP 2, FP 1, FN 0)", html, StringComparison.Ordinal);
        // The per-tag gallery shows baseline (the first system) by tag, same ranking: curve f4, f1; day f1, f2; dusk f4, f3.
        string[] byTag = [.. Regex.Matches(html, "<figure class=\"thumb\" data-tag=\"([^\"]+)\" data-frame=\"([^\"]+)\" data-system=\"baseline\"")
            .Select(m => m.Groups[1].Value + ":" + m.Groups[2].Value)];
        Assert.Equal(["curve:clip/f4.png", "curve:clip/f1.png", "day:clip/f1.png", "day:clip/f2.png", "dusk:clip/f4.png", "dusk:clip/f3.png"], byTag);
        string worstSection = html[html.IndexOf("<section id=\"gallery\">", StringComparison.Ordinal)..html.IndexOf("<section id=\"tag-gallery\">", StringComparison.Ordinal)];
        MatchCollection thumbs = Regex.Matches(worstSection, "<img alt=\"[^\"]*\" width=\"([0-9]+)\" height=\"([0-9]+)\" src=\"data:image/jpeg;base64,");
        Assert.Equal(5, thumbs.Count);
        Assert.All(thumbs, m => Assert.Equal("480x270", m.Groups[1].Value + "x" + m.Groups[2].Value)); // 640x360 scaled to the 480 px cap
        Assert.Contains("Caution: LaneBaseline is an evaluation baseline", html, StringComparison.Ordinal);
        Assert.DoesNotContain("src=\"http", html, StringComparison.Ordinal);
        Assert.DoesNotContain("<script", html, StringComparison.Ordinal);
        Assert.DoesNotContain("<link", html, StringComparison.Ordinal);
    }

    // common practice: chart ids must be unique within one page or clip paths of one chart apply to another.
    [Fact]
    public void Report_SvgIds_UniqueAcrossPage()
    {
        (int exit, string err, string html) = Report(ScoreTwo(), dir.File("r.html"), gallery: false);
        Assert.True(exit == 0, err);
        string[] ids = [.. Regex.Matches(html, " id=\"([^\"]+)\"").Select(m => m.Groups[1].Value)];
        Assert.Equal(ids.Length, ids.Distinct(StringComparer.Ordinal).Count());
        Assert.Contains(ids, id => id.StartsWith("c1-", StringComparison.Ordinal));
    }

    [Fact]
    public void Report_SameInputsAndTimestamp_ByteIdentical()
    {
        string json = ScoreTwo();
        Assert.Equal(0, Report(json, dir.File("a.html")).Exit);
        Assert.Equal(0, Report(json, dir.File("b.html")).Exit);
        Assert.Equal(File.ReadAllBytes(dir.File("a.html")), File.ReadAllBytes(dir.File("b.html")));
        Assert.Contains(FixedTime, File.ReadAllText(dir.File("a.html")), StringComparison.Ordinal);
    }

    [Fact]
    public void Report_SingleSystemWithoutIntervals_SaysWhyEmptySectionsAreEmpty()
    {
        string json = dir.File("one.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", scene.Truth, "--pred", scene.Baseline, "--json", json, "--bootstrap", "0").Exit);
        (int exit, string err, string html) = Report(json, dir.File("one.html"), gallery: false);
        Assert.True(exit == 0, err);
        Assert.Contains("One system only", html, StringComparison.Ordinal);
        Assert.Contains("No intervals", html, StringComparison.Ordinal);
        Assert.Contains("Not requested", html, StringComparison.Ordinal);
        Assert.Contains("data-system=\"baseline\"", html, StringComparison.Ordinal); // name from settings.predictions
        Assert.Contains("id=\"chart-confidence\"", html, StringComparison.Ordinal); // the lanes carry confidences
    }

    [Fact]
    public void Score_ReportOption_WritesTheSamePageAsReport()
    {
        string json = dir.File("s.json"), page = dir.File("s.html");
        (int exit, _, string err) = CliRunner.Run("score", "--truth", scene.Truth, "--pred", "baseline=" + scene.Baseline, "--pred", "net=" + scene.Net, "--json", json, "--bootstrap", "50", "--report", page, "--frames", scene.Frames);
        Assert.True(exit == 0, err);
        string html = File.ReadAllText(page);
        Assert.Contains("<section id=\"gallery\">", html, StringComparison.Ordinal);
        Assert.Contains("data:image/jpeg;base64,", html, StringComparison.Ordinal);

        // Same numbers as a page made by 'report' from the JSON the run wrote (only the time line differs).
        (int exit2, _, string html2) = Report(json, dir.File("r.html"));
        Assert.Equal(0, exit2);
        Assert.Equal(Row(html2, "headline-table", "net"), Row(html, "headline-table", "net"));
    }

    [Fact]
    public void Report_MissingScoreFile_Exit3NamesFileNoOutput()
    {
        string output = dir.File("r.html");
        (int exit, string err, _) = Report(dir.File("nope.json"), output, gallery: false);
        Assert.Equal(3, exit);
        Assert.Contains("nope.json: file not found", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    [Theory]
    [InlineData("{\"frames\": 3,\n \"iou_f1\": {", ":2: malformed JSON")]
    [InlineData("[1, 2]", "(root): expected a JSON object")]
    [InlineData("{\"frames\": 3, \"truth_lanes\": 1, \"pred_lanes\": 1}", "(root).iou_f1: missing")]
    [InlineData("{\"systems\": {\"a\": {\"frames\": \"x\"}}}", "systems.a.iou_f1: missing")]
    public void Report_MalformedScoreJson_Exit3NamesFileAndPlaceNoOutput(string content, string expected)
    {
        string json = dir.File("bad.json"), output = dir.File("r.html");
        File.WriteAllText(json, content);
        (int exit, string err, _) = Report(json, output, gallery: false);
        Assert.Equal(3, exit);
        Assert.Contains("bad.json", err, StringComparison.Ordinal);
        Assert.Contains(expected, err, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    [Fact]
    public void Report_UnreadableFrame_Exit3NamesImageNoHalfPage()
    {
        string json = ScoreTwo(), output = dir.File("r.html");
        File.WriteAllText(Path.Combine(scene.Frames, "clip", "f4.png"), "not an image");
        (int exit, string err, _) = Report(json, output);
        Assert.Equal(3, exit);
        Assert.Contains("f4.png: cannot be read as an image", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));

        File.Delete(Path.Combine(scene.Frames, "clip", "f4.png"));
        (exit, err, _) = Report(json, output);
        Assert.Equal(3, exit);
        Assert.Contains("image of frame 'clip/f4.png' not found", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    [Fact]
    public void Report_GalleryOptionsIncomplete_UsageError()
    {
        // --frames alone takes the paths recorded in the score file; --frames with only --truth is incomplete
        (int exit, _, string err) = CliRunner.Run("report", "--score", ScoreTwo(), "-o", dir.File("r.html"), "--frames", scene.Frames, "--truth", scene.Truth);
        Assert.Equal(2, exit);
        Assert.Contains("--frames, --truth and --pred together", err, StringComparison.Ordinal);
        Assert.Equal(2, CliRunner.Run("report", "--score", ScoreTwo("x.json"), "-o", dir.File("r.html"), "--generated-at", "yesterday").Exit);
    }

    /// <summary>The text of the table row for a system (tables put one system per row).</summary>
    internal static string Row(string html, string tableId, string system)
    {
        int table = html.IndexOf($"<table id=\"{tableId}\">", StringComparison.Ordinal);
        Assert.True(table >= 0, tableId + " missing");
        int start = html.IndexOf($"<tr data-system=\"{system}\">", table, StringComparison.Ordinal);
        Assert.True(start >= 0, $"{tableId}: no row for {system}");
        return html[start..html.IndexOf("</tr>", start, StringComparison.Ordinal)];
    }

    private static void AssertCell(string row, string key, double expected)
    {
        string r = expected.ToString("R", CultureInfo.InvariantCulture), shown = expected.ToString("0.000", CultureInfo.InvariantCulture);
        Assert.Contains($"<td data-key=\"{key}\" data-value=\"{r}\">{shown}", row, StringComparison.Ordinal);
    }
}
