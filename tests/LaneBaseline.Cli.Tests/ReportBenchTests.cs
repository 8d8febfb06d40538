using System.Globalization;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary><c>report --bench</c>: the per-stage cost section built from <c>bench --json</c>.</summary>
public sealed class ReportBenchTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    // Source: docs/bench.md (bench JSON schema 1); expected rows and numbers are read back from the JSON itself.
    [Fact]
    public void Report_WithBench_HasCostSection_WithOneRowPerRun()
    {
        string bench = dir.File("b.json");
        (int exit, _, string err) = CliRunner.Run("bench", "--render", "2", "--size", "128x96", "--thread-counts", "1,2", "--warmup", "1", "--passes", "1", "--json", bench);
        Assert.True(exit == 0, err);
        string score = Score();
        string html = dir.File("r.html");
        (exit, _, err) = CliRunner.Run("report", "--score", score, "--bench", bench, "-o", html, "--generated-at", "2026-01-31T12:00:00Z");
        Assert.True(exit == 0, err);
        string page = File.ReadAllText(html);
        Assert.Contains("<section id=\"bench\">", page, StringComparison.Ordinal);
        Assert.Contains("id=\"chart-bench\"", page, StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(bench));
        JsonElement[] runs = [.. doc.RootElement.GetProperty("runs").EnumerateArray()];
        string table = Regex.Match(page, "<table id=\"bench-table\">.*?</table>", RegexOptions.Singleline).Value;
        Assert.Equal(runs.Length, Regex.Count(table, "<tr><th scope=\"row\">"));
        string fps = runs[0].GetProperty("frames_per_second").GetDouble().ToString("0.0", CultureInfo.InvariantCulture);
        Assert.Contains("<td>" + fps + "</td>", table, StringComparison.Ordinal);

        // The section sits between the audit section and the configuration.
        string[] ids = [.. Regex.Matches(page, "<section id=\"([^\"]+)\">").Select(m => m.Groups[1].Value)];
        Assert.Equal(Array.IndexOf(ids, "audit") + 1, Array.IndexOf(ids, "bench"));
        Assert.Equal(Array.IndexOf(ids, "bench") + 1, Array.IndexOf(ids, "configuration"));
    }

    [Fact]
    public void Report_BadBench_Exits3_WithoutScore_Exits2()
    {
        string score = Score();
        string bad = dir.File("bad.json");
        File.WriteAllText(bad, "{\"schema_version\":2,\"machine\":{}}");
        string html = dir.File("r.html");
        (int exit, _, string err) = CliRunner.Run("report", "--score", score, "--bench", bad, "-o", html);
        Assert.Equal(3, exit);
        Assert.StartsWith("error: " + bad, err, StringComparison.Ordinal);
        Assert.False(File.Exists(html));
        Assert.Equal(2, CliRunner.Run("report", "--bench", bad, "-o", html).Exit);
    }

    private string Score()
    {
        string truth = dir.File("t.lanes.jsonl"), json = dir.File("s.json");
        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 640, 360, Lanes.Vertical(100, 360))]);
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", json, "--bootstrap", "0").Exit);
        return json;
    }
}
