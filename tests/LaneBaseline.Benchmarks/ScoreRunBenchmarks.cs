using BenchmarkDotNet.Attributes;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Vision.Metrics;

namespace LaneBaseline.Benchmarks;

/// <summary>
/// <c>score</c>'s work without the process start: <see cref="ScoreRun"/> over 1,100 generated 1280x720 frames with
/// four truth and four predicted lanes of 11 points (both passes: validation and scoring), one thread.
/// <see cref="KeepPoints"/> 0 streams every input twice (the behaviour before pass 1 kept its records); the default
/// budget parses each input once. Divide 1,100 by the mean for frames/s.
/// </summary>
[MemoryDiagnoser]
public class ScoreRunBenchmarks
{
    private string dir = null!;

    /// <summary>Point budget of the records pass 1 keeps for pass 2.</summary>
    [Params(0L, ScoreRun.KeepBudgetPoints)]
    public long KeepPoints { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        dir = Directory.CreateTempSubdirectory("lb-scorerun-").FullName;
        SoakData.Write(1100, dir, 1280, 720);
    }

    [Benchmark]
    public long ScoreRun1100Frames()
    {
        var run = new ScoreRun(Path.Combine(dir, "truth.lanes.jsonl"), [new ScoredSystem("p", Path.Combine(dir, "pred.lanes.jsonl"))], new ScoreSettings())
        {
            KeepPoints = KeepPoints,
        };
#pragma warning disable IDISP004 // ScoreRun disposes the rasterizers it creates
        return run.Execute(() => new OpenCvLaneRasterizer())[0].Overall.Frames;
#pragma warning restore IDISP004
    }

    [GlobalCleanup]
    public void Cleanup() => Directory.Delete(dir, recursive: true);
}
