using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary><c>audit --stills</c> (temporal rules off) and <c>audit --summary-json</c> (per-rule summary).</summary>
public sealed class AuditStillsSummaryTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    // A dropped frame (LBA-T03, docs/audit.md) and a swapped slot pair (LBA-I06) in clean synthetic truth: as a
    // sequence both fire; as stills only the image rule can, and the summary names the temporal rules as not run.
    [Fact]
    public void Stills_TurnTemporalRulesOff_SummaryJsonSaysSo()
    {
        List<LaneRecord> records = [.. SyntheticRoad.Clean(seed: 3, sequences: 2, framesPerSequence: 20)];
        var lanes = records[5].Lanes.ToList();
        (lanes[1], lanes[2]) = (new Lane { Points = lanes[1].Points, Slot = 1 }, new Lane { Points = lanes[2].Points, Slot = -1 });
        records[5] = new LaneRecord { Frame = records[5].Frame, Width = 1280, Height = 720, Lanes = lanes };
        records.RemoveAt(12);
        string pred = dir.File("p.lanes.jsonl"), seq = dir.File("seq.jsonl"), still = dir.File("still.jsonl");
        string seqSummary = dir.File("seq.summary.json"), stillSummary = dir.File("still.summary.json");
        Lanes.WriteFile(pred, records);
        (int exit, string stdout, string err) = CliRunner.Run("audit", "--pred", pred, "-o", seq, "--summary-json", seqSummary);
        Assert.True(exit == 0, err);
        Assert.DoesNotContain("--stills", stdout, StringComparison.Ordinal);
        (exit, stdout, err) = CliRunner.Run("audit", "--pred", pred, "-o", still, "--stills", "--summary-json", stillSummary);
        Assert.True(exit == 0, err);
        Assert.Contains("Temporal rules (LBA-T01..T03) did not run: --stills", stdout, StringComparison.Ordinal);
        Assert.Contains(File.ReadAllLines(seq), l => l.Contains("\"rule\":\"LBA-T03\"", StringComparison.Ordinal));
        Assert.DoesNotContain(File.ReadAllLines(still), l => l.Contains("\"rule\":\"LBA-T", StringComparison.Ordinal));

        using JsonDocument a = JsonDocument.Parse(File.ReadAllText(seqSummary));
        using JsonDocument b = JsonDocument.Parse(File.ReadAllText(stillSummary));
        Assert.False(a.RootElement.GetProperty("stills").GetBoolean());
        Assert.True(b.RootElement.GetProperty("stills").GetBoolean());
        Assert.Equal(10.0, a.RootElement.GetProperty("fps").GetDouble()); // default like detect and render
        JsonElement Rule(JsonDocument d, string id) => d.RootElement.GetProperty("rules").EnumerateArray().Single(r => r.GetProperty("id").GetString() == id);
        Assert.True(Rule(a, "LBA-T03").GetProperty("ran").GetBoolean());
        Assert.Equal(1, Rule(a, "LBA-T03").GetProperty("findings").GetInt32());
        Assert.False(Rule(b, "LBA-T03").GetProperty("ran").GetBoolean());
        Assert.Equal(0, Rule(b, "LBA-T03").GetProperty("findings").GetInt32());
        Assert.Equal(1, Rule(b, "LBA-I06").GetProperty("frames").GetInt32());
        Assert.False(Rule(b, "LBA-G01").GetProperty("ran").GetBoolean()); // no camera
        Assert.Equal(b.RootElement.GetProperty("findings").GetInt32(), b.RootElement.GetProperty("rules").EnumerateArray().Sum(r => r.GetProperty("findings").GetInt32()));
    }
}
