using System.Text;
using System.Text.RegularExpressions;
using LaneBaseline.Reporting.Score;
using Xunit;

namespace LaneBaseline.Reporting.Tests;

/// <summary>The page's verdict line, the tag comparison grouped by kind, the reliability chart and the zoomed axes.</summary>
public sealed class VerdictAndTagKindTests
{
    private static readonly DateTimeOffset Noon = new(2026, 1, 31, 12, 0, 0, TimeSpan.Zero);

    private static ScoreDocument Parse(string json) => ScoreDocumentReader.Parse(Encoding.UTF8.GetBytes(json), "s.json");

    // common practice (printed tables show no sign on zero): an interval bound that rounds to zero at the shown
    // precision is printed "0.000", not "-0.000" (seen in a verdict's "[-0.383, -0.000]" before this check).
    [Theory]
    [InlineData(-0.0, "0.000")]
    [InlineData(-0.0004, "0.000")]
    [InlineData(-0.0006, "-0.001")]
    [InlineData(0.0004, "0.000")]
    [InlineData(-1.5, "-1.500")]
    public void Numbers_RoundingToZero_HaveNoMinusSign(double value, string shown) => Assert.Equal(shown, HtmlReportWriter.F(value, "0.000"));

    private static string Render(ScoreDocument doc) => HtmlReportWriter.Render(new ReportInput { Score = doc, ScoreSource = "s.json", GeneratedAt = Noon });

    // HtmlReportWriterTests.TwoSystemsJson: F1@0.50 alpha 2/3, beta 0.9; paired alpha - beta: F1 diff -0.2333 with
    // interval [-0.5, -0.05] (excludes 0), accuracy diff -0.28 with [-0.6, 0.02] (includes 0). No system is named
    // "baseline", so the first (alpha) is the baseline and beta the network: the signs flip to beta - alpha.
    [Fact]
    public void Verdict_NamesBetterSystem_Amount_AndWhetherTheIntervalExcludesZero()
    {
        string v = HtmlReportWriter.Verdict(Parse(HtmlReportWriterTests.TwoSystemsJson()));
        Assert.Equal(
            "Verdict, beta against alpha: F1@0.50: beta is better by 0.233 (95 % paired interval of beta − alpha [0.050, 0.500] excludes 0); "
            + "point accuracy: beta is better by 0.280 (95 % paired interval of beta − alpha [-0.020, 0.600] includes 0: not a clear difference).",
            v);
        // a system named "baseline" is the baseline wherever it stands: net - baseline as written, no flip
        string w = HtmlReportWriter.Verdict(Parse(HtmlReportWriterTests.TwoSystemsJson("net", "baseline")));
        Assert.StartsWith("Verdict, net against baseline: F1@0.50: net is worse by 0.233 (95 % paired interval of net − baseline [-0.500, -0.050] excludes 0)", w, StringComparison.Ordinal);
        string html = Render(Parse(HtmlReportWriterTests.TwoSystemsJson("net", "baseline")));
        Assert.True(html.IndexOf("id=\"verdict\"", StringComparison.Ordinal) < html.IndexOf("<nav>", StringComparison.Ordinal), "verdict above the navigation");
    }

    // common practice: grouping keys by kind; the kinds and their members are the renderer's tag families.
    [Theory]
    [InlineData("night", "condition")]
    [InlineData("rain", "condition")]
    [InlineData("curve", "road layout")]
    [InlineData("lanes-3", "road layout")]
    [InlineData("two-way", "road layout")]
    [InlineData("concrete", "road surface")]
    [InlineData("markings-us", "markings")]
    [InlineData("worn-paint", "markings")]
    [InlineData("highway", "condition")]
    public void TagKind_GroupsTheRenderersTags(string tag, string kind) => Assert.Equal(kind, HtmlReportWriter.TagKind(tag));

    [Fact]
    public void TagComparison_GroupedByKindInStableOrder_WithDeltaColumn()
    {
        string json = HtmlReportWriterTests.TwoSystemsJson("net", "baseline");
        string[] tags = ["worn-paint", "curve", "rain", "asphalt", "lanes-3", "markings-us", "night"];
        string Block(string tag, double f1) => $$$"""
            "{{{tag}}}": {"frames": 2, "truth_lanes": 4, "pred_lanes": 4,
               "iou_f1": {"width_px": 30, "thresholds": {"0.50": {"tp": 2, "fp": 2, "fn": 2, "precision": 0.5, "recall": 0.5, "f1": {{{f1.ToString(System.Globalization.CultureInfo.InvariantCulture)}}}}}, "mf1": 0.1},
               "point_accuracy": {"tolerance_px": 20.0, "accuracy": 0.5, "fp_rate": 0.5, "fn_rate": 0.5, "matched": 2, "truth_lanes": 4, "pred_lanes": 4}}
            """;
        int first = json.IndexOf("\"by_tag\": {", StringComparison.Ordinal);
        int end = json.IndexOf("\"baseline\": {", first, StringComparison.Ordinal);
        string netTags = "\"by_tag\": {" + string.Join(",", tags.Select(t => Block(t, 0.25))) + "}}\n,";
        json = json[..first] + netTags + json[end..];
        json = json.Replace("\"by_tag\": {}", "\"by_tag\": {" + string.Join(",", tags.Select(t => Block(t, 0.75))) + "}", StringComparison.Ordinal);
        string html = Render(Parse(json));
        string table = html[html.IndexOf("<table id=\"tag-compare-table\">", StringComparison.Ordinal)..];
        table = table[..table.IndexOf("</table>", StringComparison.Ordinal)];
        string[] order = [.. Regex.Matches(table, "<tr data-tag=\"([^\"]+)\" data-kind=\"([^\"]+)\">").Select(m => m.Groups[2].Value + ":" + m.Groups[1].Value)];
        Assert.Equal(["condition:night", "condition:rain", "road layout:curve", "road layout:lanes-3", "road surface:asphalt", "markings:markings-us", "markings:worn-paint"], order);
        // delta = net - baseline = 0.25 - 0.75
        Assert.Equal(7, Regex.Count(table, "data-key=\"delta_f1@0.50\" data-value=\"-0.5\" class=\"worse\""));
    }

    // The reliability chart and table show the score file's calibration block (ECE: Naeini, Cooper & Hauskrecht 2015).
    [Fact]
    public void Calibration_ShownAsReliabilityChartAndTable()
    {
        string json = HtmlReportWriterTests.TwoSystemsJson().Replace(
            "\"by_tag\": {\"night\"",
            """
            "calibration": {"outcome": "tp", "scored_lanes": 8, "ece": 0.125,
               "reliability": [{"low": 0.0, "high": 0.1, "lanes": 0, "mean_score": null, "precision": null},
                               {"low": 0.5, "high": 0.6, "lanes": 4, "mean_score": 0.55, "precision": 0.5},
                               {"low": 0.9, "high": 1.0, "lanes": 4, "mean_score": 0.95, "precision": 0.75}],
               "pr_curve": [], "best_f1": {"min_score": 0.5, "pred_lanes": 8, "tp": 6, "precision": 0.75, "recall": 0.6, "f1": 0.6666666666666666}},
            "by_tag": {"night"
            """,
            StringComparison.Ordinal);
        ScoreDocument doc = Parse(json);
        CalibrationSummary c = doc.Systems[0].Calibration!;
        Assert.Equal((8L, 0.125, 3, 0.5), (c.ScoredLanes, c.Ece, c.Bins.Count, c.BestThreshold));
        Assert.Null(doc.Systems[1].Calibration);
        string html = Render(doc);
        Assert.Matches("<figure class=\"chart\" id=\"chart-reliability\"><svg ", html);
        Assert.Contains("<tr data-system=\"alpha\"><th scope=\"row\">alpha</th><td data-key=\"scored_lanes\">8</td><td data-key=\"ece\" data-value=\"0.125\">0.125</td>", html, StringComparison.Ordinal);
    }

    // common practice: an axis zoomed to its data keeps a margin and stays inside the metric's range [0, 1].
    [Fact]
    public void ZoomRange_PadsAndClips()
    {
        (double lo, double hi) = Charts.ZoomRange([0.58, 0.74]);
        Assert.Equal(0.56, lo, 12);
        Assert.Equal(0.76, hi, 12);
        Assert.Equal((0.0, 1.0), Charts.ZoomRange([]));
        (lo, hi) = Charts.ZoomRange([0.3, 1.0]);
        Assert.Equal(0.23, lo, 12);
        Assert.Equal(1.0, hi);
    }
}
