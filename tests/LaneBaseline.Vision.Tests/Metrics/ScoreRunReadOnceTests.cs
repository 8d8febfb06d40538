using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Metrics;
using Xunit;

namespace LaneBaseline.Vision.Tests.Metrics;

/// <summary>
/// Pass 1 of <see cref="ScoreRun"/> keeps the records it validated for pass 2 while they fit a point budget. The
/// oracle is the streaming path (budget 0: every input read twice, as before the budget existed): every frame's
/// scores and every total must be the same, for inputs that fit, that overflow the budget part-way through a
/// prediction file, and for predictions out of truth order with missing frames.
/// </summary>
public sealed class ScoreRunReadOnceTests : IDisposable
{
    private readonly string dir = Directory.CreateTempSubdirectory("lb-readonce-").FullName;

    public void Dispose() => Directory.Delete(dir, recursive: true);

    [Theory]
    [InlineData(Core.Metrics.ScoreRun.KeepBudgetPoints)] // everything kept
    [InlineData(200)] // the budget runs out in the second prediction file
    [InlineData(1)] // the budget runs out at the first truth record
    public void KeptRecords_ScoreExactlyAsStreamedTwice(long budget)
    {
        (string truth, ScoredSystem[] systems) = WriteInputs();
        (List<FrameScore[]> streamedFrames, IReadOnlyList<SystemScore> streamed) = Run(truth, systems, keepPoints: 0);
        (List<FrameScore[]> keptFrames, IReadOnlyList<SystemScore> kept) = Run(truth, systems, budget);

        Assert.Equal(streamedFrames.Count, keptFrames.Count);
        for (int i = 0; i < streamedFrames.Count; i++)
        {
            for (int s = 0; s < systems.Length; s++)
            {
                FrameScore a = streamedFrames[i][s], b = keptFrames[i][s];
                Assert.Equal(a.Frame, b.Frame);
                Assert.Equal(a.PredLanes, b.PredLanes);
                Assert.Equal(a.IouF1.TruePositives, b.IouF1.TruePositives);
                Assert.Equal(a.IouF1.AssignedIous, b.IouF1.AssignedIous);
                Assert.Equal(a.Points.AccuracySum, b.Points.AccuracySum);
            }
        }

        for (int s = 0; s < systems.Length; s++)
        {
            Assert.Equal(streamed[s].Overall.IouF1.TruePositives, kept[s].Overall.IouF1.TruePositives);
            Assert.Equal(streamed[s].Overall.PredLanes, kept[s].Overall.PredLanes);
            Assert.Equal(streamed[s].Coverage!.Missing, kept[s].Coverage!.Missing);
            Assert.Equal(streamed[s].Coverage!.FirstMissing, kept[s].Coverage!.FirstMissing);
        }

        // The scores must not be trivial: some prediction matched and some frame predicted nothing.
        Assert.True(streamed[0].Overall.IouF1.TruePositives[0] > 0);
        Assert.Contains(streamedFrames, row => row[1].PredLanes == 0);
    }

    private (string Truth, ScoredSystem[] Systems) WriteInputs()
    {
        var truth = new List<LaneRecord>();
        var near = new List<LaneRecord>();
        var sparse = new List<LaneRecord>();
        for (int f = 0; f < 12; f++)
        {
            string key = $"drive/{f:000}.png";
            double x = 300 + (10 * f);
            truth.Add(Lanes.Truth(key, 1280, 720, Lanes.Of((x, 719), (x + 80, 400)), Lanes.Of((x + 500, 719), (x + 420, 400))));
            near.Add(Lanes.Pred(key, Lanes.Of((x + 4, 719), (x + 84, 400)), Lanes.Of((x + 900, 719), (x + 880, 500))));
            if (f % 3 != 0)
            {
                sparse.Add(Lanes.Pred(key, Lanes.Of((x + 500 + f, 719), (x + 420, 400))));
            }
        }

        sparse.Reverse(); // out of truth order: the joiner buffers when streaming
        string t = Path.Combine(dir, "truth.lanes.jsonl"), a = Path.Combine(dir, "a.lanes.jsonl"), b = Path.Combine(dir, "b.lanes.jsonl");
        Lanes.WriteFile(t, truth);
        Lanes.WriteFile(a, near);
        Lanes.WriteFile(b, sparse);
        return (t, [new ScoredSystem("a", a), new ScoredSystem("b", b)]);
    }

    private static (List<FrameScore[]> Frames, IReadOnlyList<SystemScore> Results) Run(string truth, ScoredSystem[] systems, long keepPoints)
    {
        var frames = new List<FrameScore[]>();
        var run = new ScoreRun(truth, systems, new ScoreSettings())
        {
            KeepPoints = keepPoints,
            OnFrame = row => frames.Add([.. row]),
        };
        IReadOnlyList<SystemScore> results = run.Execute(() => new OpenCvLaneRasterizer());
        return (frames, results);
    }
}
