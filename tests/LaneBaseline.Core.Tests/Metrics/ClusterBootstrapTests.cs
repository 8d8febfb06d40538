using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;
using LaneBaseline.Core.Random;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class ClusterBootstrapTests
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

    private static BootstrapSeries Series(IEnumerable<FrameScore> frames)
    {
        var s = new BootstrapSeries();
        foreach (FrameScore f in frames)
        {
            s.Add(f, 0);
        }

        return s;
    }

    // Source: Davison & Hinkley 1997, Sec. 3.8 (cluster bootstrap: resample whole clusters): with one frame per
    // cluster the draws are the frame bootstrap's, so for the same seed every resampled statistic is identical.
    [Fact]
    public void OneFramePerSequence_EqualsFrameBootstrap_ForTheSameSeed()
    {
        var rng = new SplitMix64(7);
        FrameScore[] frames = [.. Enumerable.Range(0, 40).Select(i =>
        {
            int truth = 1 + rng.NextInt(4), pred = rng.NextInt(5);
            return Frame($"drive{i:00}/000001.png", Math.Min(truth, pred) - rng.NextInt(1 + Math.Min(truth, pred)) + 0, truth, pred, rng.NextInt(truth + 1) * 0.5);
        })];
        BootstrapSeries a = Series(frames), b = Series(frames.Select(f => Frame(f.Frame, f.IouF1.TruePositives[0], f.TruthLanes, f.PredLanes, f.Points.AccuracySum)));
        Assert.Equal(40, a.ClusterCount);
        double[][][] seq = Bootstrap.Resample([a, b], 300, 11, 2, BootstrapUnit.Sequence);
        double[][][] frm = Bootstrap.Resample([a, b], 300, 11, 1, BootstrapUnit.Frame);
        for (int s = 0; s < 2; s++)
        {
            for (int k = 0; k < 4; k++)
            {
                Assert.Equal(frm[s][k], seq[s][k]);
            }
        }
    }

    // Source: Davison & Hinkley 1997, Sec. 3.8, stage-one resampling written out directly from the definition
    // (draw K cluster indices, concatenate all their frames, compute the statistic) as an independent reference.
    [Fact]
    public void SequenceBootstrap_MatchesDirectDefinition()
    {
        var frames = new List<FrameScore>();
        var rng = new SplitMix64(3);
        for (int c = 0; c < 9; c++)
        {
            int len = 1 + rng.NextInt(6);
            for (int i = 0; i < len; i++)
            {
                int truth = 2 + rng.NextInt(3), pred = 1 + rng.NextInt(4);
                frames.Add(Frame($"seq{c}/{i:000000}.png", rng.NextInt(1 + Math.Min(truth, pred)), truth, pred, rng.NextInt(truth + 1)));
            }
        }

        BootstrapSeries series = Series(frames);
        Assert.Equal(9, series.ClusterCount);
        double[][][] got = Bootstrap.Resample([series], 50, 5, 1, BootstrapUnit.Sequence);
        string[] clusterNames = [.. frames.Select(f => f.Frame.Split('/')[0]).Distinct()];
        for (int b = 0; b < 50; b++)
        {
            SplitMix64 draw = SplitMix64.ForStream(5, (ulong)b);
            long tp = 0, truth = 0, pred = 0;
            for (int i = 0; i < clusterNames.Length; i++)
            {
                string name = clusterNames[draw.NextInt(clusterNames.Length)];
                foreach (FrameScore f in frames.Where(f => f.Frame.StartsWith(name + "/", StringComparison.Ordinal)))
                {
                    tp += f.IouF1.TruePositives[0];
                    truth += f.TruthLanes;
                    pred += f.PredLanes;
                }
            }

            // F1 = 2TP / (pred + truth) (docs/metrics.md: F1 = 2PR/(P+R) simplifies to this)
            double f1 = pred + truth == 0 ? 0 : 2.0 * tp / (pred + truth);
            Assert.Equal(f1, got[0][(int)BootstrapStatistic.F1][b], 12);
        }
    }

    // Source: Davison & Hinkley 1997, Sec. 3.8: frames of one sequence are correlated; in the extreme where each
    // sequence is m identical copies of one frame, resampling frames treats K·m frames as independent and gives an
    // interval roughly sqrt(m) times too narrow, while resampling sequences gives the width of K independent frames.
    [Fact]
    public void CopiedFrames_SequenceIntervalIsWiderThanFrameInterval()
    {
        var rng = new SplitMix64(21);
        var frames = new List<FrameScore>();
        for (int c = 0; c < 30; c++)
        {
            int truth = 4, tp = rng.NextInt(5), pred = 4;
            for (int i = 0; i < 16; i++)
            {
                frames.Add(Frame($"clip{c:00}.mp4#{i:000000}", tp, truth, pred, tp));
            }
        }

        BootstrapSeries series = Series(frames);
        Assert.Equal(BootstrapUnit.Sequence, Bootstrap.DefaultUnit(series));
        Interval seq = Bootstrap.Percentiles(Bootstrap.Resample([series], 1000, 1, 2, BootstrapUnit.Sequence)[0][0], 0.95);
        Interval frm = Bootstrap.Percentiles(Bootstrap.Resample([series], 1000, 1, 2, BootstrapUnit.Frame)[0][0], 0.95);
        double ratio = (seq.High - seq.Low) / (frm.High - frm.Low);
        Assert.InRange(ratio, 3.0, 5.5); // sqrt(16) = 4, with Monte Carlo noise of 1000 resamples
    }

    [Fact]
    public void DefaultUnit_FrameWhenKeysHaveNoSequences()
    {
        Assert.Equal(BootstrapUnit.Frame, Bootstrap.DefaultUnit(Series([Frame("a.png", 1, 1, 1, 1), Frame("b.png", 1, 1, 1, 1)])));
        // a single sequence cannot be resampled as sequences
        Assert.Equal(BootstrapUnit.Frame, Bootstrap.DefaultUnit(Series([Frame("d/000001.png", 1, 1, 1, 1), Frame("d/000002.png", 1, 1, 1, 1)])));
    }
}
