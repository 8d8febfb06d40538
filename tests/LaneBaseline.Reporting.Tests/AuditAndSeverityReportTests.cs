using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Core;
using LaneBaseline.Reporting.Audit;
using LaneBaseline.Reporting.Score;
using Xunit;

namespace LaneBaseline.Reporting.Tests;

public sealed class AuditAndSeverityReportTests
{
    private static readonly DateTimeOffset Noon = new(2026, 1, 31, 12, 0, 0, TimeSpan.Zero);

    // Findings in the shape docs/audit.md gives (rank, frame, rule, name, severity, lane, other_lane, value, limit,
    // unit, message), hand-made: LBA-I01 twice on a.png, LBA-I04 on a.png and b.png, LBA-T03 on c.png -> 5 findings
    // on 3 frames; I01: 2 findings on 1 frame, I04: 2 on 2, T03: 1 on 1.
    private const string Findings = """
        {"rank":1,"frame":"a.png","rule":"LBA-I01","name":"lanes-cross","severity":"error","lane":0,"other_lane":1,"value":14.5,"limit":2,"unit":"px","message":"lanes 0 and 1 cross"}
        {"rank":1,"frame":"a.png","rule":"LBA-I01","name":"lanes-cross","severity":"error","lane":1,"other_lane":2,"value":7.25,"limit":2,"unit":"px","message":"lanes 1 and 2 cross"}
        {"rank":1,"frame":"a.png","rule":"LBA-I04","name":"short-lane","severity":"warning","lane":3,"value":11,"limit":20,"unit":"px","message":"lane 3 is short"}

        {"rank":2,"frame":"b.png","rule":"LBA-I04","name":"short-lane","severity":"warning","lane":0,"value":9.5,"limit":20,"unit":"px","message":"lane 0 is short"}
        {"rank":3,"frame":"seq/000012.png","rule":"LBA-T03","name":"frame-gap","severity":"warning","lane":null,"value":3,"limit":1,"unit":"frames","message":"gap <3>"}
        """;

    private static AuditSummary Summarise(string text, int top = AuditFindingsReader.DefaultTop) =>
        AuditFindingsReader.Read(new StringReader(text), "f.jsonl", top);

    private static string Render(ScoreDocument? score, AuditSummary? audit) => HtmlReportWriter.Render(new ReportInput
    {
        Score = score,
        ScoreSource = score is null ? null : "s.json",
        Audit = audit,
        GeneratedAt = Noon,
        Versions = [new("lanebaseline", "test")],
    });

    // Source: docs/audit.md (findings file fields); counts recomputed here from the JSONL itself with System.Text.Json.
    [Fact]
    public void Read_CountsPerRuleAndFrames_MatchTheLines()
    {
        AuditSummary s = Summarise(Findings, top: 3);
        var lines = Findings.Split('\n').Where(l => l.Trim().Length > 0).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        Assert.Equal(lines.Count, s.Findings);
        Assert.Equal(lines.Select(l => l.GetProperty("frame").GetString()).Distinct().Count(), s.FlaggedFrames);
        foreach (IGrouping<string?, JsonElement> g in lines.GroupBy(l => l.GetProperty("rule").GetString()))
        {
            AuditRuleCount row = Assert.Single(s.Rules, r => r.Id == g.Key);
            Assert.Equal(g.Count(), row.Findings);
            Assert.Equal(g.Select(l => l.GetProperty("frame").GetString()).Distinct().Count(), row.Frames);
        }

        Assert.Equal(0, Assert.Single(s.Rules, r => r.Id == "LBA-B01").Findings); // every catalogue rule is listed
        Assert.Equal(3, s.Top.Count); // capped, in file order
        Assert.Equal(["LBA-I01", "LBA-I01", "LBA-I04"], s.Top.Select(t => t.Rule));
        Assert.Equal(7.25, s.Top[1].Value);
    }

    [Theory]
    [InlineData("{\"rank\":1,\"frame\":\"a\",\"rule\":\"LBA-I01\",\"name\":\"n\",\"severity\":\"error\",\"value\":1,\"limit\":2}\n{\"rank\":1,", "f.jsonl:2: malformed JSON")]
    [InlineData("[1]", "f.jsonl:1: expected one JSON object")]
    [InlineData("\n\n{\"rank\":1,\"frame\":\"a\",\"rule\":\"LBA-I01\",\"name\":\"n\",\"severity\":\"bad\",\"value\":1,\"limit\":2}", "f.jsonl:3: severity:")]
    [InlineData("{\"rank\":1,\"frame\":\"a\",\"rule\":\"LBA-I01\",\"name\":\"n\",\"severity\":\"error\",\"limit\":2}", "f.jsonl:1: value: missing")]
    public void Read_BadLine_NamesFileAndLine(string text, string expected)
    {
        BadInputException ex = Assert.Throws<BadInputException>(() => Summarise(text));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_AuditOnly_HasAuditConfigCaution_AndNumbersFromTheFile()
    {
        string html = Render(null, Summarise(Findings));
        Assert.Equal(HtmlReportWriter.AuditOnlySectionIds, [.. Regex.Matches(html, "<section id=\"([^\"]+)\">").Select(m => m.Groups[1].Value)]);
        Assert.Matches("<figure class=\"chart\" id=\"chart-audit\"><svg ", html);
        Assert.Contains("<tr data-rule=\"LBA-I04\"><th scope=\"row\">LBA-I04</th><td class=\"t\">short-lane</td>", html, StringComparison.Ordinal);
        Assert.Matches("<tr data-rule=\"LBA-I01\">.*<td data-key=\"findings\">2</td><td data-key=\"frames\">1</td></tr>", html);
        Assert.Matches("<tr data-rule=\"LBA-I04\">.*<td data-key=\"findings\">2</td><td data-key=\"frames\">2</td></tr>", html);
        Assert.Equal(5, Regex.Count(html, "<tr data-rule=\"[^\"]+\" data-frame="));
        Assert.Contains("data-value=\"14.5\">14.5</td>", html, StringComparison.Ordinal);
        Assert.Contains("gap &lt;3&gt;", html, StringComparison.Ordinal); // messages are escaped
        Assert.Contains(SafetyNotice.Text, html, StringComparison.Ordinal);
        Assert.DoesNotContain("id=\"headline\"", html, StringComparison.Ordinal);
    }

    // Issue 15: the page lists every finding grouped by frame (rank order), not only the first twenty lines; with a
    // bound below the file's count it says how many it left out. Expected groups recomputed from the JSONL itself.
    [Fact]
    public void Render_AuditFindings_GroupedByFrame_AllListed_OrTheRestCounted()
    {
        var sb = new StringBuilder();
        for (int k = 0; k < 30; k++)
        {
            string frame = "lap-" + (k / 4).ToString("0000", CultureInfo.InvariantCulture) + ".png";
            sb.Append(CultureInfo.InvariantCulture, $$"""{"rank":{{(k / 4) + 1}},"frame":"{{frame}}","rule":"LBA-I01","name":"lanes-cross","severity":"{{(k % 2 == 0 ? "error" : "warning")}}","lane":0,"other_lane":1,"value":{{k}},"limit":2,"unit":"px","message":"m{{k}}"}""").Append('\n');
        }

        string text = sb.ToString();
        var frames = text.Split('\n').Where(l => l.Length > 0).Select(l => JsonDocument.Parse(l).RootElement.GetProperty("frame").GetString()!).ToList();
        string html = Render(null, Summarise(text));
        Assert.Equal(30, Regex.Count(html, "<tr data-rule=\"LBA-I01\" data-frame="));
        Assert.Equal(frames.Distinct().ToList(), [.. Regex.Matches(html, "<details class=\"audit-frame\" data-frame=\"([^\"]+)\"").Select(m => m.Groups[1].Value)]);
        foreach (IGrouping<string, string> g in frames.GroupBy(f => f))
        {
            Assert.Contains("<code>" + g.Key + "</code>: " + g.Count() + " finding" + (g.Count() == 1 ? string.Empty : "s"), html, StringComparison.Ordinal);
        }

        Assert.Contains("All 30 findings, on 8 frames.", html, StringComparison.Ordinal);
        Assert.Equal(8, Regex.Count(html, "<details class=\"audit-frame\"[^>]* open>"));

        string bounded = Render(null, Summarise(text, top: 10));
        Assert.Equal(10, Regex.Count(bounded, "<tr data-rule=\"LBA-I01\" data-frame="));
        Assert.Contains("The first 10 findings of 30 findings, on 3 frames; the findings file holds the rest.", bounded, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_ScoreAndAudit_AuditSectionBeforeConfiguration_Deterministic()
    {
        ScoreDocument doc = ScoreDocumentReader.Parse(Encoding.UTF8.GetBytes(HtmlReportWriterTests.TwoSystemsJson()), "s.json");
        string html = Render(doc, Summarise(Findings));
        Assert.Equal(HtmlReportWriter.SectionIds, [.. Regex.Matches(html, "<section id=\"([^\"]+)\">").Select(m => m.Groups[1].Value)]);
        Assert.Contains("id=\"chart-audit\"", html, StringComparison.Ordinal);
        Assert.Equal(html, Render(doc, Summarise(Findings)));
        Assert.Contains("Not requested: pass <code>--audit", Render(doc, null), StringComparison.Ordinal);
    }

    private static string Tally(double f1) => string.Create(CultureInfo.InvariantCulture, $$$"""
        {"frames": 2, "truth_lanes": 4, "pred_lanes": 4,
         "iou_f1": {"width_px": 30, "thresholds": {"0.50": {"tp": 1, "fp": 1, "fn": 1, "precision": 0.5, "recall": 0.5, "f1": {{{f1}}}}}, "mf1": 0.1},
         "point_accuracy": {"tolerance_px": 20.0, "accuracy": 0.5, "fp_rate": 0.5, "fn_rate": 0.5, "matched": 1, "truth_lanes": 4, "pred_lanes": 4}}
        """);

    private static ScoreDocument WithTags(IEnumerable<(string Tag, double F1)> tags)
    {
        string byTag = "{" + string.Join(", ", tags.Select(t => JsonSerializer.Serialize(t.Tag) + ": " + Tally(t.F1))) + "}";
        string json = HtmlReportWriterTests.TwoSystemsJson().Replace("\"by_tag\": {}", "\"by_tag\": " + byTag, StringComparison.Ordinal);
        return ScoreDocumentReader.Parse(Encoding.UTF8.GetBytes(json), "s.json");
    }

    // Source: render --sweep tags frames "severity=X.XX" (RenderJob); common practice: a curve needs the levels sorted.
    [Fact]
    public void Render_SeverityTags_DrawCurveAndTable_OnlyWhenPresent()
    {
        string html = Render(WithTags([("fog", 0.5), ("severity=1.00", 0.25), ("severity=0.00", 0.875), ("severity=0.50", 0.625)]), null);
        Assert.Matches("<figure class=\"chart\" id=\"chart-severity\"><svg ", html);
        string table = Regex.Match(html, "<table id=\"severity-table\">.*?</table>", RegexOptions.Singleline).Value;
        Assert.Contains("<th>0.00</th><th>0.50</th><th>1.00</th>", table, StringComparison.Ordinal);
        Assert.Contains("data-key=\"severity=0.00\" data-value=\"0.875\"", table, StringComparison.Ordinal);
        Assert.Contains("data-key=\"severity=1.00\" data-value=\"0.25\"", table, StringComparison.Ordinal);

        string plain = Render(WithTags([("fog", 0.5), ("night", 0.25)]), null);
        Assert.Contains("id=\"chart-tags\"", plain, StringComparison.Ordinal);
        Assert.DoesNotContain("chart-severity", plain, StringComparison.Ordinal);
        Assert.DoesNotContain("severity-table", plain, StringComparison.Ordinal);
    }

    // common practice: more than 8 category labels on a 900 px chart overlap unless slanted (24 tags did).
    [Fact]
    public void TagBars_ManyTags_LabelsRotatedAndShortened()
    {
        var tags = Enumerable.Range(0, 24).Select(i => ("condition-with-a-long-name-" + i.ToString("00", CultureInfo.InvariantCulture), 0.5)).ToList();
        string html = Render(WithTags(tags), null);
        string svg = Regex.Match(html, "id=\"chart-tags\"><svg.*?</svg>", RegexOptions.Singleline).Value;
        // A -45 degree rotation as an SVG matrix: cos 45 = sin 45 = 0.707107, one per tag label (24 + "night" of alpha).
        Assert.Equal(25, Regex.Count(svg, "<text transform=\"matrix\\(0\\.707107 -0\\.707107 0\\.707107 0\\.707107 "));
        Assert.DoesNotContain("condition-with-a-long-name-07", svg, StringComparison.Ordinal);
        Assert.Contains(Charts.Shorten("condition-with-a-long-name-07"), svg, StringComparison.Ordinal);
        Assert.Contains("condition-with-a-long-name-07", html, StringComparison.Ordinal); // full name in the table

        string few = Render(WithTags([("fog", 0.5), ("night", 0.25)]), null);
        Assert.DoesNotContain("matrix(0.707107", Regex.Match(few, "id=\"chart-tags\"><svg.*?</svg>", RegexOptions.Singleline).Value, StringComparison.Ordinal);
    }

    [Fact]
    public void Shorten_KeepsStartAndEnd_WithinCap()
    {
        Assert.Equal("fog", Charts.Shorten("fog"));
        string s = Charts.Shorten("condition-with-a-long-name-07");
        Assert.Equal(Charts.MaxLabelChars, s.Length);
        Assert.StartsWith("condition-", s, StringComparison.Ordinal);
        Assert.EndsWith("name-07", s, StringComparison.Ordinal);
    }
}
