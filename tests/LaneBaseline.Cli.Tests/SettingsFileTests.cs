using System.Text.Json;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary><c>score --config</c> and <c>audit --config</c>: settings from YAML (docs/cli.md, "Settings files").</summary>
public sealed class SettingsFileTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    private string Truth()
    {
        string path = dir.File("truth.lanes.jsonl");
        Lanes.WriteFile(path,
        [
            Lanes.Truth("s/000001.png", 640, 360, Lanes.Of((100, 359), (300, 180)), Lanes.Of((540, 359), (340, 180))),
            Lanes.Truth("s/000002.png", 640, 360, Lanes.Of((110, 359), (305, 180))),
        ]);
        return path;
    }

    [Fact]
    public void Score_SettingsFromYaml_GiveTheSameResultsAsTheOptions_AndTheCommandLineWins()
    {
        string truth = Truth(), yaml = dir.File("score.yaml"), a = dir.File("a.json"), b = dir.File("b.json"), c = dir.File("c.json");
        File.WriteAllText(yaml, "# team settings\nbootstrap: 0\niou: [0.4, 0.6]\nlane_width_px: 12\n");
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--config", yaml, "--json", a).Exit);
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--bootstrap", "0", "--iou", "0.4", "--iou", "0.6", "--lane-width-px", "12", "--json", b).Exit);
        Assert.Equal(File.ReadAllText(b), File.ReadAllText(a));
        using (JsonDocument doc = JsonDocument.Parse(File.ReadAllText(a)))
        {
            Assert.True(doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").TryGetProperty("0.40", out _));
            Assert.Equal(12, doc.RootElement.GetProperty("iou_f1").GetProperty("width_px").GetInt32());
            Assert.False(doc.RootElement.TryGetProperty("intervals", out _));
        }

        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--config", yaml, "--bootstrap", "20", "--json", c).Exit);
        using JsonDocument withIntervals = JsonDocument.Parse(File.ReadAllText(c));
        Assert.Equal(20, withIntervals.RootElement.GetProperty("intervals").GetProperty("resamples").GetInt32());
    }

    [Fact]
    public void Score_SettingsWithSeveralErrors_ListsThemAll_Exit3()
    {
        string truth = Truth(), yaml = dir.File("bad.yaml");
        File.WriteAllText(yaml, "bogus: 1\nbootstrap: many\ntruth: other.lanes.jsonl\niou: [0.4, [1]]\n");
        (int exit, string stdout, string err) = CliRunner.Run("score", "--truth", truth, "--pred", truth, "--config", yaml);
        Assert.Equal(3, exit);
        Assert.Equal(string.Empty, stdout);
        string[] lines = err.Trim().Split('\n');
        Assert.Equal(4, lines.Length);
        Assert.StartsWith("error: " + yaml + ":1: bogus: unknown setting", lines[0], StringComparison.Ordinal);
        Assert.StartsWith("error: " + yaml + ":2: bootstrap:", lines[1], StringComparison.Ordinal);
        Assert.StartsWith("error: " + yaml + ":3: truth: an input or output", lines[2], StringComparison.Ordinal);
        Assert.StartsWith("error: " + yaml + ":4: iou: expected a value", lines[3], StringComparison.Ordinal);
    }

    [Fact]
    public void Audit_GateFromSettings_ActsLikeTheOption()
    {
        string truth = Truth(), yaml = dir.File("audit.yaml");
        // A lane far outside plausible geometry makes findings; with fail-on: warning from the file the gate trips.
        string pred = dir.File("p.lanes.jsonl");
        Lanes.WriteFile(pred, [Lanes.Truth("s/000001.png", 640, 360, Lanes.Of((100, 359), (600, 350)), Lanes.Of((120, 359), (610, 352)))]);
        File.WriteAllText(yaml, "fail-on: warning\n");
        int viaOption = CliRunner.Run("audit", "--pred", pred, "-o", dir.File("f1.jsonl"), "--fail-on", "warning").Exit;
        int viaFile = CliRunner.Run("audit", "--pred", pred, "-o", dir.File("f2.jsonl"), "--config", yaml).Exit;
        Assert.Equal(viaOption, viaFile);
        Assert.Equal(File.ReadAllText(dir.File("f1.jsonl")), File.ReadAllText(dir.File("f2.jsonl")));
        File.WriteAllText(yaml, "fail-on: sometimes\n");
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", pred, "-o", dir.File("f3.jsonl"), "--config", yaml);
        Assert.Equal(2, exit); // the value is checked by the command itself, as for --fail-on sometimes
        Assert.Contains("--fail-on must be none, warning or error", err, StringComparison.Ordinal);
    }
}
