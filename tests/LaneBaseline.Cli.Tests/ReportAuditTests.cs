using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary><c>report --audit</c> and <c>audit --report</c>: the audit findings section of the HTML page.</summary>
public sealed class ReportAuditTests : IDisposable
{
    private const string FixedTime = "2026-01-31T12:00:00Z";
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    // Two lanes that meet and run past their vanishing row on one frame, a jump and a short fragment on the next
    // (several rules of docs/audit.md fire).
    private string Lanes()
    {
        string path = dir.File("p.lanes.jsonl");
        File.WriteAllText(path, string.Join("\n",
            "{\"frame\":\"s/000001.png\",\"width\":640,\"height\":360,\"lanes\":[{\"points\":[[100,359],[300,250],[500,200]]},{\"points\":[[500,359],[300,250],[100,200]]}]}",
            "{\"frame\":\"s/000002.png\",\"width\":640,\"height\":360,\"lanes\":[{\"points\":[[200,359],[330,200]]},{\"points\":[[500,359],[505,355]]}]}") + "\n");
        return path;
    }

    private string Findings()
    {
        string findings = dir.File("f.jsonl");
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", Lanes(), "-o", findings, "--threads", "1");
        Assert.True(exit == 0, err);
        return findings;
    }

    // Source: docs/audit.md (findings fields); the expected counts are recounted from the JSONL file itself.
    [Fact]
    public void Report_AuditOnly_RuleCountsMatchJsonl_AndDeterministic()
    {
        string findings = Findings();
        var lines = File.ReadLines(findings).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        Assert.True(lines.Select(l => l.GetProperty("rule").GetString()).Distinct().Count() >= 2, "the scene should trip several rules");

        string a = dir.File("a.html"), b = dir.File("b.html");
        (int exit, _, string err) = CliRunner.Run("report", "--audit", findings, "-o", a, "--generated-at", FixedTime);
        Assert.True(exit == 0, err);
        string html = File.ReadAllText(a);
        Assert.Equal(["audit", "configuration", "caution"], Regex.Matches(html, "<section id=\"([^\"]+)\">").Select(m => m.Groups[1].Value));
        Assert.Matches("<figure class=\"chart\" id=\"chart-audit\"><svg ", html);
        foreach (IGrouping<string?, JsonElement> g in lines.GroupBy(l => l.GetProperty("rule").GetString()))
        {
            int frames = g.Select(l => l.GetProperty("frame").GetString()).Distinct().Count();
            Assert.Matches($"<tr data-rule=\"{g.Key}\">.*<td data-key=\"findings\">{g.Count()}</td><td data-key=\"frames\">{frames}</td></tr>", html);
        }

        Assert.Equal(Math.Min(20, lines.Count), Regex.Count(html, "<tr data-rule=\"[^\"]+\" data-frame="));
        Assert.Equal(0, CliRunner.Run("report", "--audit", findings, "-o", b, "--generated-at", FixedTime).Exit);
        Assert.Equal(File.ReadAllBytes(a), File.ReadAllBytes(b));
    }

    [Fact]
    public void Audit_ReportOption_WritesTheSamePageAsReportAudit()
    {
        string findings = dir.File("f.jsonl"), page = dir.File("audit.html"), again = dir.File("again.html");
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", Lanes(), "-o", findings, "--threads", "1", "--report", page, "--generated-at", FixedTime);
        Assert.True(exit == 0, err);
        Assert.Equal(0, CliRunner.Run("report", "--audit", findings, "-o", again, "--generated-at", FixedTime).Exit);
        Assert.Equal(File.ReadAllText(again), File.ReadAllText(page));
        Assert.Contains("id=\"chart-audit\"", File.ReadAllText(page), StringComparison.Ordinal);
    }

    [Fact]
    public void Report_BadAuditLine_Exit3NamesFileLine_NoOutput()
    {
        string findings = dir.File("bad.jsonl"), output = dir.File("r.html");
        File.WriteAllText(findings, "{\"rank\":1,\"frame\":\"a\",\"rule\":\"LBA-I04\",\"name\":\"short-lane\",\"severity\":\"warning\",\"lane\":0,\"value\":3,\"limit\":20,\"unit\":\"px\",\"message\":\"m\"}\n{\"rank\": oops}\n");
        (int exit, _, string err) = CliRunner.Run("report", "--audit", findings, "-o", output, "--generated-at", FixedTime);
        Assert.Equal(3, exit);
        Assert.Contains("bad.jsonl:2: malformed JSON", err, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    [Fact]
    public void Report_NeitherScoreNorAudit_UsageError()
    {
        string output = dir.File("r.html");
        (int exit, _, string err) = CliRunner.Run("report", "-o", output);
        Assert.Equal(2, exit);
        Assert.Contains("--score, --audit or both", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }
}
