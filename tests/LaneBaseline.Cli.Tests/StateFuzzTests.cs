using CsCheck;
using LaneBaseline.Core;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

// Property (CLI contract: bad input is exit 3 with a message, never an unhandled exception): the readers behind
// `merge` — partial score and audit states — fed random mutations of valid states (written by the CLI) either accept
// them or throw BadInputException naming the file.
public sealed class StateFuzzTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void AuditStateMerge_MutatedState_OnlyBadInput()
    {
        string pred = dir.File("pred.lanes.jsonl");
        var records = SyntheticRoad.Clean(seed: 5, sequences: 2, framesPerSequence: 6).ToList();
        records.RemoveAt(3); // a frame gap, so the state holds findings
        Lanes.WriteFile(pred, records);
        AssertRuns("audit", "--pred", pred, "--baseline", pred, "--partial", dir.File("a.state"));
        Fuzz(dir.File("a.state"), path => AuditStateMerge.Merge([path]));
    }

    [Fact]
    public void ScoreStateMerge_MutatedState_OnlyBadInput()
    {
        string truth = dir.File("truth.lanes.jsonl");
        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 640, 360, Lanes.Vertical(100, 360), Lanes.Of((300, 359), (320, 200))), Lanes.Truth("b.png", 640, 360, Lanes.Vertical(500, 360))]);
        AssertRuns("score", "--truth", truth, "--pred", truth, "--partial", dir.File("s.state"), "--bootstrap", "10");
        Fuzz(dir.File("s.state"), path => ScoreStateMerge.Merge([path]));
    }

    [Fact]
    public void ScoreStateMerge_MutatedMaskState_OnlyBadInput()
    {
        string truth = dir.File("truth.lanes.jsonl"), tm = dir.File("tm");
        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 160, 90, Lanes.Vertical(40, 90), Lanes.Of((120, 89), (100, 20))), Lanes.Truth("b.png", 160, 90, Lanes.Vertical(80, 90))]);
        AssertRuns("convert", truth, "-o", tm);
        AssertRuns("score", "--truth", tm, "--pred", tm, "--partial", dir.File("m.state"), "--bootstrap", "10");
        Assert.Contains("\"t\":\"mask\"", File.ReadAllText(dir.File("m.state")), StringComparison.Ordinal);
        Fuzz(dir.File("m.state"), path => ScoreStateMerge.Merge([path], onMask: _ => { }));
    }

    // The CLI run that writes the valid state: on failure the message carries its error output.
    private static void AssertRuns(params string[] args)
    {
        (int exit, _, string err) = CliRunner.Run(args);
        Assert.True(exit == 0, "exit " + exit + ": " + err);
    }

    private void Fuzz(string validPath, Action<string> merge)
    {
        byte[] valid = File.ReadAllBytes(validPath);
        merge(validPath); // the unmutated state is accepted
        int n = 0;
        Mutations.Of(valid).Sample(
            bytes =>
            {
                string path = dir.File($"m{Interlocked.Increment(ref n)}.state");
                File.WriteAllBytes(path, bytes);
                try
                {
                    merge(path);
                }
                catch (BadInputException ex)
                {
                    Assert.True(ex.Message.Contains(Path.GetFileName(path), StringComparison.Ordinal), ex.Message);
                }
            },
            iter: 1500,
            threads: 1);
    }
}
