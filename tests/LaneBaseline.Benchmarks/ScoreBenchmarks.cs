using BenchmarkDotNet.Attributes;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Metrics;

namespace LaneBaseline.Benchmarks;

/// <summary>
/// Scoring cost of one 1920x1080 frame with 4 truth and 4 predicted lanes (11 points each), one thread: the
/// target is at least 1,000 frames/s, i.e. a mean under 1 ms.
/// </summary>
[MemoryDiagnoser]
#pragma warning disable IDISP006, CA1001 // BenchmarkDotNet needs an unsealed class; the rasterizer is disposed in [GlobalCleanup]
public class ScoreBenchmarks
{
    private readonly OpenCvLaneRasterizer rasterizer = new();
    private FrameScorer scorer = null!;
    private LaneRecord truth = null!;
    private LaneRecord pred = null!;
    private LaneRecord predWithConfidence = null!;

    [GlobalSetup]
    public void Setup()
    {
        scorer = new FrameScorer(rasterizer, new ScoreSettings());
        Lane Make(double x0, double dx, double? score)
        {
            double xt = 820 + ((x0 - 820) * 0.1);
            var pts = Enumerable.Range(0, 11).Select(s => new LanePoint(x0 + ((xt - x0) * s / 10) + dx, 589 - ((589 - 280) * s / 10.0))).ToList();
            return new Lane { Points = pts, Score = score };
        }

        double[] xs = [300, 700, 1000, 1400];
        truth = Lanes.Truth("f", 1920, 1080, [.. xs.Select(x => Make(x, 0, null))]);
        pred = Lanes.Pred("f", [.. xs.Select((x, i) => Make(x, (i * 7) - 10, null))]);
        predWithConfidence = Lanes.Pred("f", [.. xs.Select((x, i) => Make(x, (i * 7) - 10, 0.2 * (i + 1)))]);
    }

    [Benchmark(Baseline = true)]
    public FrameScore ScoreFrame() => scorer.Score(truth, pred);

    [Benchmark]
    public FrameScore ScoreFrameWithConfidenceSweep() => scorer.Score(truth, predWithConfidence);

    [GlobalCleanup]
    public void Cleanup() => rasterizer.Dispose();
}
#pragma warning restore IDISP006, CA1001
