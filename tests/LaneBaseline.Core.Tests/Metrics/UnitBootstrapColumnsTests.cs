using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;
using LaneBaseline.Core.Random;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class UnitBootstrapColumnsTests
{
    private static FrameScore Frame(string key, int tp, int truth, int pred, double acc) => new()
    {
        Frame = key,
        Tags = [],
        TruthLanes = truth,
        PredLanes = pred,
        IouF1 = new FrameIouF1([tp], []),
        Points = new FramePointAccuracy(acc, 0),
    };

    // Source: Efron & Tibshirani 1993, An Introduction to the Bootstrap, Ch. 6 (the bootstrap replication is the
    // statistic computed on the resampled data), written out directly: draw n frames from SplitMix64.ForStream(seed, b),
    // accuracy = sum of drawn accuracy sums / sum of drawn truth lanes (docs/metrics.md section 2). The frames share
    // TP, truth and predicted lanes, so only the point accuracy unit's own column varies: its interval must follow
    // that column while the IoU F1 unit's statistics stay a point.
    [Fact]
    public void PointAccuracyColumn_DrivesOnlyTheAccuracyInterval()
    {
        var rng = new SplitMix64(17);
        FrameScore[] frames = [.. Enumerable.Range(0, 25).Select(i => Frame($"f{i:00}.png", 2, 3, 3, rng.NextInt(4)))];
        var series = new BootstrapSeries();
        foreach (FrameScore f in frames)
        {
            series.Add(f, 0);
        }

        double[][][] got = Bootstrap.Resample([series], 200, 9, 2, BootstrapUnit.Frame);
        for (int b = 0; b < 200; b++)
        {
            SplitMix64 draw = SplitMix64.ForStream(9, (ulong)b);
            double acc = 0;
            long truth = 0;
            for (int i = 0; i < frames.Length; i++)
            {
                FrameScore f = frames[draw.NextInt(frames.Length)];
                acc += f.Points.AccuracySum;
                truth += f.TruthLanes;
            }

            Assert.Equal(acc / truth, got[0][(int)BootstrapStatistic.Accuracy][b], 12);
            Assert.Equal(2.0 / 3.0, got[0][(int)BootstrapStatistic.F1][b], 12); // 2TP / (pred + truth) = 4/6 in every resample
        }

        Interval accuracy = Bootstrap.Percentiles(got[0][(int)BootstrapStatistic.Accuracy], 0.95);
        Assert.True(accuracy.High > accuracy.Low);
    }

    // common practice: a series is one table, every frame with the same columns; a series mixing frames with and
    // without the mF1 thresholds' TP columns is refused rather than resampled misaligned.
    [Fact]
    public void MixingFramesWithAndWithoutMeanF1Columns_IsRefused()
    {
        var series = new BootstrapSeries();
        series.Add(Frame("a.png", 1, 1, 1, 1), 0, [0, 0]);
        Assert.Throws<InvalidOperationException>(() => series.Add(Frame("b.png", 1, 1, 1, 1), 0));
        Assert.Throws<InvalidOperationException>(() => Bootstrap.ResampleWithMeanF1([Series(Frame("c.png", 1, 1, 1, 1))], 10, 1, 1, BootstrapUnit.Frame));
    }

    private static BootstrapSeries Series(FrameScore frame)
    {
        var s = new BootstrapSeries();
        s.Add(frame, 0);
        return s;
    }
}
