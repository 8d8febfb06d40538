using System.Text;
using System.Text.RegularExpressions;
using LaneBaseline.Core;
using LaneBaseline.Reporting.Score;
using Xunit;

namespace LaneBaseline.Reporting.Tests;

public sealed class HtmlReportWriterTests
{
    private static readonly DateTimeOffset Noon = new(2026, 1, 31, 12, 0, 0, TimeSpan.Zero);

    // A two-system document in the shape of docs/metrics.md (score JSON) (keys as ScoreJsonWriter writes them). Numbers are
    // hand-made and self-consistent: A at 0.50 has TP 6, FP 2, FN 4 -> P 0.75, R 0.6, F1 2PR/(P+R) = 0.9/1.35 = 2/3.
    internal static string TwoSystemsJson(string nameA = "alpha", string nameB = "beta") => $$$$"""
        {
          "systems": {
            "{{{{nameA}}}}": {
              "frames": 5, "truth_lanes": 10, "pred_lanes": 8,
              "iou_f1": {"width_px": 30, "thresholds": {
                 "0.10": {"tp": 7, "fp": 1, "fn": 3, "precision": 0.875, "recall": 0.7, "f1": 0.7777777777777778},
                 "0.50": {"tp": 6, "fp": 2, "fn": 4, "precision": 0.75, "recall": 0.6, "f1": 0.6666666666666666},
                 "0.75": {"tp": 3, "fp": 5, "fn": 7, "precision": 0.375, "recall": 0.3, "f1": 0.3333333333333333}},
                 "mf1": 0.41},
              "point_accuracy": {"tolerance_px": 20.0, "accuracy": 0.62, "fp_rate": 0.25, "fn_rate": 0.4, "matched": 6, "truth_lanes": 10, "pred_lanes": 8},
              "intervals": {"method": "percentile bootstrap over frames", "level": 0.95, "resamples": 200, "seed": 7,
                 "f1@0.50": [0.4, 0.85], "precision@0.50": [0.5, 1.0], "recall@0.50": [0.3, 0.9], "accuracy": [0.41, 0.8]},
              "confidence_sweep": [
                 {"min_score": 0.0, "tp": 6, "fp": 2, "fn": 4, "precision": 0.75, "recall": 0.6, "f1": 0.6666666666666666},
                 {"min_score": 0.5, "tp": 5, "fp": 0, "fn": 5, "precision": 1.0, "recall": 0.5, "f1": 0.6666666666666666}],
              "by_tag": {"night": {"frames": 2, "truth_lanes": 4, "pred_lanes": 3,
                 "iou_f1": {"width_px": 30, "thresholds": {"0.50": {"tp": 1, "fp": 2, "fn": 3, "precision": 0.3333333333333333, "recall": 0.25, "f1": 0.2857142857142857}}, "mf1": 0.1},
                 "point_accuracy": {"tolerance_px": 20.0, "accuracy": 0.3, "fp_rate": 0.5, "fn_rate": 0.75, "matched": 1, "truth_lanes": 4, "pred_lanes": 3}}}
            },
            "{{{{nameB}}}}": {
              "frames": 5, "truth_lanes": 10, "pred_lanes": 10,
              "iou_f1": {"width_px": 30, "thresholds": {
                 "0.10": {"tp": 10, "fp": 0, "fn": 0, "precision": 1.0, "recall": 1.0, "f1": 1.0},
                 "0.50": {"tp": 9, "fp": 1, "fn": 1, "precision": 0.9, "recall": 0.9, "f1": 0.9},
                 "0.75": {"tp": 8, "fp": 2, "fn": 2, "precision": 0.8, "recall": 0.8, "f1": 0.8}},
                 "mf1": 0.7},
              "point_accuracy": {"tolerance_px": 20.0, "accuracy": 0.9, "fp_rate": null, "fn_rate": 0.1, "matched": 9, "truth_lanes": 10, "pred_lanes": 10},
              "by_tag": {}
            }
          },
          "paired": {"{{{{nameA}}}} - {{{{nameB}}}}": {"a": "{{{{nameA}}}}", "b": "{{{{nameB}}}}",
             "f1@0.50": {"diff": -0.2333333333333334, "ci95": [-0.5, -0.05]},
             "accuracy": {"diff": -0.28, "ci95": [-0.6, 0.02]}}},
          "settings": {"truth": "t.lanes.jsonl", "predictions": {"{{{{nameA}}}}": "a.lanes.jsonl", "{{{{nameB}}}}": "b.lanes.jsonl"},
             "lane_width_px": null, "tolerance_px": null, "iou_thresholds": ["0.10", "0.50", "0.75"], "bootstrap_resamples": 200, "seed": 7}
        }
        """;

    private static ScoreDocument Parse(string json) => ScoreDocumentReader.Parse(Encoding.UTF8.GetBytes(json), "s.json");

    private static string Render(ScoreDocument doc, DateTimeOffset? at = null) => HtmlReportWriter.Render(new ReportInput
    {
        Score = doc,
        ScoreSource = "s.json",
        GeneratedAt = at ?? Noon,
        Versions = [new("lanebaseline", "test")],
    });

    [Fact]
    public void Render_TwoSystems_EverySectionChartAndTable()
    {
        string html = Render(Parse(TwoSystemsJson()));
        Assert.Equal(HtmlReportWriter.SectionIds, [.. Regex.Matches(html, "<section id=\"([^\"]+)\">").Select(m => m.Groups[1].Value)]);
        Assert.Equal(4, Regex.Count(html, "<svg "));
        foreach (string table in new[] { "headline-table", "iou-table", "confidence-table", "tag-table", "paired-table", "settings-table", "versions-table" })
        {
            Assert.Contains($"<table id=\"{table}\">", html, StringComparison.Ordinal);
        }

        Assert.StartsWith("<!DOCTYPE html>", html, StringComparison.Ordinal);
        Assert.EndsWith("</html>\n", html, StringComparison.Ordinal);
        Assert.Contains(SafetyNotice.Text, html, StringComparison.Ordinal);
        Assert.Contains("2026-01-31T12:00:00Z", html, StringComparison.Ordinal);
    }

    // Source: the numbers of TwoSystemsJson above (the page must show what the file says, at 3 decimals).
    [Fact]
    public void Render_HeadlineNumbers_MatchTheDocument()
    {
        string html = Render(Parse(TwoSystemsJson()));
        string alpha = Row(html, "headline-table", "alpha");
        Assert.Contains("<td data-key=\"f1@0.50\" data-value=\"0.6666666666666666\">0.667 <span class=\"ci\">[0.400, 0.850]</span></td>", alpha, StringComparison.Ordinal);
        Assert.Contains("<td data-key=\"mf1\" data-value=\"0.41\">0.410</td>", alpha, StringComparison.Ordinal);
        Assert.Contains("<td data-key=\"accuracy\" data-value=\"0.62\">0.620 <span class=\"ci\">[0.410, 0.800]</span></td>", alpha, StringComparison.Ordinal);
        string beta = Row(html, "headline-table", "beta");
        Assert.Contains("<td data-key=\"f1@0.50\" data-value=\"0.9\">0.900</td>", beta, StringComparison.Ordinal); // no intervals for beta
        Assert.Contains("<td data-key=\"fp_rate\" data-value=\"\">–</td>", beta, StringComparison.Ordinal); // null in the file
        Assert.Contains("<td data-key=\"0.75\" data-value=\"0.3333333333333333\">0.333</td>", Row(html, "iou-table", "alpha"), StringComparison.Ordinal);
        Assert.Contains("data-tag=\"night\" data-system=\"alpha\"", html, StringComparison.Ordinal);
    }

    // Reading of a paired interval: [-0.5, -0.05] excludes 0 with B above A; [-0.6, 0.02] holds 0.
    [Fact]
    public void Render_Paired_ReadsIntervalsAgainstZero()
    {
        string html = Render(Parse(TwoSystemsJson()));
        Assert.Matches("data-stat=\"f1@0.50\">.*<td data-value=\"-0.2333333333333334\">-0.233</td><td>\\[-0.500, -0.050\\]</td><td class=\"t\">beta higher</td>", html);
        Assert.Matches("data-stat=\"accuracy\">.*\\[-0.600, \\+0.020\\]</td><td class=\"t\">no clear difference</td>", html);
    }

    [Fact]
    public void Render_SameInput_SameText_TimeIsTheOnlyDifference()
    {
        ScoreDocument doc = Parse(TwoSystemsJson());
        string a = Render(doc), b = Render(Parse(TwoSystemsJson()));
        Assert.Equal(a, b);
        string later = Render(doc, Noon.AddHours(5));
        Assert.NotEqual(a, later);
        Assert.Equal(a, later.Replace("2026-01-31T17:00:00Z", "2026-01-31T12:00:00Z", StringComparison.Ordinal));
    }

    [Fact]
    public void Render_NamesWithMarkup_AreEscaped()
    {
        string html = Render(Parse(TwoSystemsJson("<b>x</b>", "y&z")));
        Assert.DoesNotContain("<b>x</b>", html, StringComparison.Ordinal);
        Assert.Contains("&lt;b&gt;x&lt;/b&gt;", html, StringComparison.Ordinal);
        Assert.Contains("y&amp;z", html, StringComparison.Ordinal);
    }

    // common practice: a self-contained page loads nothing from elsewhere, and inline SVGs scale with a viewBox.
    [Fact]
    public void Render_SelfContained_ScalableCharts_UniqueIds()
    {
        string html = Render(Parse(TwoSystemsJson()));
        Assert.DoesNotMatch("(src|href)=\"(https?:)?//", html);
        Assert.DoesNotContain("<script", html, StringComparison.Ordinal);
        Assert.DoesNotContain("<?xml", html, StringComparison.Ordinal);
        Assert.Equal(4, Regex.Count(html, "<svg [^>]*viewBox=\"0 0 [0-9]+ [0-9]+\""));
        string[] ids = [.. Regex.Matches(html, " id=\"([^\"]+)\"").Select(m => m.Groups[1].Value)];
        Assert.Equal(ids.Length, ids.Distinct(StringComparer.Ordinal).Count());
        Assert.DoesNotMatch(" [xy]=\"[^\"]*,\\s*\"", html);
        Assert.Contains("@media print", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_Gallery_EmbedsJpegAndLegend()
    {
        byte[] jpeg = [0xFF, 0xD8, 0xFF, 0xD9];
        string html = HtmlReportWriter.Render(new ReportInput
        {
            Score = Parse(TwoSystemsJson()),
            ScoreSource = "s.json",
            GeneratedAt = Noon,
            Gallery = new Gallery([new GalleryFrame("alpha", "a/1.png", ["night"], 0, 2, 1, 0.0, 0.25, jpeg, 48, 27)], "Up to 6."),
        });
        Assert.Contains("src=\"data:image/jpeg;base64,/9j/2Q==\"", html, StringComparison.Ordinal);
        Assert.Contains("F1@0.50 0.000 (TP 0, FP 2, FN 1) · point acc. 0.250", html, StringComparison.Ordinal);
        Assert.Contains("--truth:" + OverlayColors.TruthHex, html, StringComparison.Ordinal);
        Assert.Contains("class=\"line pred\"", html, StringComparison.Ordinal);
    }

    // The per-tag section as the page states it: groups in the given order, a note for a tag without failures and
    // for the tags left out by the cap, a navigation link; the JPEG of a frame shown twice is the same data URI.
    [Fact]
    public void Render_TagGallery_GroupsNotesAndNavigation()
    {
        byte[] jpeg = [0xFF, 0xD8, 0xFF, 0xD9];
        var frame = new GalleryFrame("alpha", "a/1.png", ["night", "rain"], 0, 2, 1, 0.0, 0.25, jpeg, 48, 27);
        string html = HtmlReportWriter.Render(new ReportInput
        {
            Score = Parse(TwoSystemsJson()),
            ScoreSource = "s.json",
            GeneratedAt = Noon,
            Gallery = new Gallery([frame], "Up to 6.")
            {
                ByTag = new ConditionGallery("alpha", [new ConditionGroup("clear", 4, []), new ConditionGroup("night", 2, [frame]), new ConditionGroup("rain", 1, [frame])], ["snow", "t&x", "wet"], "Per tag."),
            },
        });
        int start = html.IndexOf("<section id=\"tag-gallery\">", StringComparison.Ordinal);
        string section = html[start..html.IndexOf("</section>", start, StringComparison.Ordinal)];
        Assert.Equal(["clear", "night", "rain"], [.. Regex.Matches(section, "<h3 data-tag=\"([^\"]+)\">").Select(m => m.Groups[1].Value)]);
        Assert.Contains("<p class=\"empty\" data-tag=\"clear\">No failures", section, StringComparison.Ordinal);
        Assert.Contains("3 more tags are not shown here: snow, t&amp;x, wet (at most 3 tags", section, StringComparison.Ordinal);
        Assert.Contains("prediction of alpha", section, StringComparison.Ordinal);
        Assert.Equal(2, Regex.Count(section, "<figure class=\"thumb\" data-tag=\"(night|rain)\" data-frame=\"a/1.png\""));
        Assert.Equal(3, Regex.Count(html, "src=\"data:image/jpeg;base64,/9j/2Q==\"")); // once in Worst frames, twice here
        Assert.Contains("<a href=\"#tag-gallery\">Worst by tag</a>", html, StringComparison.Ordinal);

        string none = Render(Parse(TwoSystemsJson()));
        int at = none.IndexOf("<section id=\"tag-gallery\">", StringComparison.Ordinal);
        Assert.Contains("<p class=\"empty\">Not requested", none[at..], StringComparison.Ordinal);
    }

    internal static string Row(string html, string tableId, string system)
    {
        int table = html.IndexOf($"<table id=\"{tableId}\">", StringComparison.Ordinal);
        Assert.True(table >= 0, tableId + " missing");
        int start = html.IndexOf($"<tr data-system=\"{system}\">", table, StringComparison.Ordinal);
        Assert.True(start >= 0, $"{tableId}: no row for {system}");
        return html[start..html.IndexOf("</tr>", start, StringComparison.Ordinal)];
    }
}
