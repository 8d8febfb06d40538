using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;
using LaneBaseline.Core.Random;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class TagBootstrapTests
{
    private static readonly ScoreSettings Settings = new();

    // A frame with the same TP at every threshold (lanes either match perfectly or not at all).
    private static FrameScore Frame(string key, string[] tags, int tp, int truth, int pred, double acc) => new()
    {
        Frame = key,
        Tags = tags,
        TruthLanes = truth,
        PredLanes = pred,
        IouF1 = new FrameIouF1([.. Settings.Thresholds.Select(_ => tp)], []),
        Points = new FramePointAccuracy(acc, 0),
    };

    private static SystemScore[] Score(IEnumerable<FrameScore[]> rows, int systems)
    {
        SystemScore[] results = ScoreRun.CreateResults([.. Enumerable.Range(0, systems).Select(s => new ScoredSystem("s" + s, "p" + s))], Settings);
        foreach (FrameScore[] row in rows)
        {
            ScoreRun.Accumulate(results, row, Settings.HalfIndex);
        }

        return results;
    }

    // Source: Efron & Tibshirani 1993, An Introduction to the Bootstrap, Ch. 13 (percentile interval), worked by hand:
    // the tag holds two frames, A (one lane, found: F1 1, accuracy 1) and B (one lane, missed: F1 0, accuracy 0).
    // A resample of two frames is AA (F1 1), AB/BA (F1 0.5) or BB (F1 0), with probabilities 1/4, 1/2, 1/4, so the
    // 2.5th and 97.5th percentiles of many resamples are 0 and 1. The untagged frames must not enter the tag's
    // resamples: were they drawn (all perfect), the lower bound would leave 0.
    [Fact]
    public void TwoFrameTag_PercentileIntervalIsTheHandWorkedOne()
    {
        FrameScore[][] rows =
        [
            [Frame("a/000001.png", ["night"], 1, 1, 1, 1.0)],
            [Frame("a/000002.png", [], 2, 2, 2, 2.0)],
            [Frame("b/000001.png", ["night"], 0, 1, 1, 0.0)],
            [Frame("b/000002.png", [], 2, 2, 2, 2.0)],
        ];
        SystemScore[] results = Score(rows, 1);
        Assert.Equal(2, results[0].TagSeries["night"].TruthLanes.Count);
        var byTag = TagBootstrap.Compute(results, 2000, 5, 2, BootstrapUnit.Frame, 0.95, null);
        TagBootstrap night = byTag["night"];
        Assert.Equal(2, night.Units);
        foreach (int stat in new[] { (int)BootstrapStatistic.F1, (int)BootstrapStatistic.Accuracy, Bootstrap.MeanF1Index })
        {
            Assert.Equal(new Interval(0.0, 1.0), night.Intervals[0][stat]);
        }

        // The middle outcome (F1 0.5) is the most frequent, about half the resamples (binomial sd 0.011 at B = 2000).
        double half = night.Samples[0][(int)BootstrapStatistic.F1].Count(v => v == 0.5) / 2000.0;
        Assert.InRange(half, 0.45, 0.55);
    }

    // Source: Efron & Tibshirani 1993, Ch. 6 (the bootstrap replicate recomputes the statistic on the resample),
    // written out directly: draw n frame indices from the same stream as the code, sum, take the percentile.
    [Fact]
    public void TagInterval_MatchesDirectDefinition_AndDoesNotDependOnThreads()
    {
        var rng = new SplitMix64(17);
        var rows = new List<FrameScore[]>();
        for (int i = 0; i < 30; i++)
        {
            int truth = 1 + rng.NextInt(3), pred = rng.NextInt(4), tp = rng.NextInt(1 + Math.Min(truth, pred));
            rows.Add([Frame($"d{i % 5}/{i:000000}.png", i % 2 == 0 ? ["rain"] : ["dry"], tp, truth, pred, tp * 0.75)]);
        }

        SystemScore[] results = Score(rows, 1);
        TagBootstrap one = TagBootstrap.Compute(results, 200, 9, 1, BootstrapUnit.Frame, 0.95, null)["rain"];
        TagBootstrap two = TagBootstrap.Compute(results, 200, 9, 2, BootstrapUnit.Frame, 0.95, null)["rain"];
        Assert.Equal(one.Samples[0][Bootstrap.MeanF1Index], two.Samples[0][Bootstrap.MeanF1Index]);

        FrameScore[] rain = [.. rows.Select(r => r[0]).Where(f => f.Tags.Contains("rain"))];
        var f1 = new double[200];
        for (int b = 0; b < 200; b++)
        {
            SplitMix64 draw = SplitMix64.ForStream(9, (ulong)b);
            long tp = 0, truth = 0, pred = 0;
            for (int i = 0; i < rain.Length; i++)
            {
                FrameScore f = rain[draw.NextInt(rain.Length)];
                tp += f.IouF1.TruePositives[0];
                truth += f.TruthLanes;
                pred += f.PredLanes;
            }

            double p = pred == 0 ? 0 : (double)tp / pred, r = truth == 0 ? 0 : (double)tp / truth;
            f1[b] = p + r == 0 ? 0 : 2 * p * r / (p + r);
        }

        Array.Sort(f1);
        // Percentile at position q·(B − 1) with linear interpolation: 0.025 · 199 = 4.975, between order statistics 4 and 5.
        Assert.Equal(f1[4] + (0.975 * (f1[5] - f1[4])), one.Intervals[0][(int)BootstrapStatistic.F1].Low, 12);
        double[] got = [.. one.Samples[0][(int)BootstrapStatistic.F1]];
        Array.Sort(got);
        for (int b = 0; b < 200; b++)
        {
            Assert.Equal(f1[b], got[b], 12); // the F1 formula's rounding differs in the last bit
        }
        // Every threshold has the same TP here, so mF1 equals F1@0.50 in every resample.
        for (int b = 0; b < 200; b++)
        {
            Assert.Equal(one.Samples[0][(int)BootstrapStatistic.F1][b], one.Samples[0][Bootstrap.MeanF1Index][b], 12);
        }
    }

    // Source: Davison & Hinkley 1997, Sec. 3.8 (cluster bootstrap): with one cluster every resample is the whole
    // sample, so the interval is the point estimate; the run warns once, as it does for the overall interval.
    [Fact]
    public void TagWithOneSequence_PointInterval_AndOneWarning()
    {
        FrameScore[][] rows =
        [
            [Frame("lap1/000001.png", ["fog"], 1, 2, 1, 1.0), Frame("lap1/000001.png", ["fog"], 0, 2, 0, 0.0)],
            [Frame("lap1/000002.png", ["fog"], 2, 2, 3, 1.5), Frame("lap1/000002.png", ["fog"], 1, 2, 1, 1.0)],
            [Frame("lap2/000001.png", ["sun"], 1, 1, 1, 1.0), Frame("lap2/000001.png", ["sun"], 1, 1, 1, 1.0)],
            [Frame("lap3/000001.png", ["sun"], 0, 1, 1, 0.0), Frame("lap3/000001.png", ["sun"], 1, 1, 1, 1.0)],
        ];
        SystemScore[] results = Score(rows, 2);
        var warnings = new List<string>();
        var byTag = TagBootstrap.Compute(results, 100, 3, 1, BootstrapUnit.Sequence, 0.95, warnings.Add);
        string w = Assert.Single(warnings);
        Assert.StartsWith("warning: ", w, StringComparison.Ordinal);
        var notes = new List<string>();
        _ = TagBootstrap.Compute(results, 100, 3, 1, BootstrapUnit.Sequence, 0.95, notes.Add, unitAsked: false);
        Assert.StartsWith("note: ", Assert.Single(notes), StringComparison.Ordinal);
        Assert.Contains("'fog'", w, StringComparison.Ordinal);
        Assert.DoesNotContain("'sun'", w, StringComparison.Ordinal);
        TagBootstrap fog = byTag["fog"];
        Assert.Equal(1, fog.Units);
        double f1 = results[0].ByTag["fog"].IouF1.At(IouThreshold.Half).F1; // TP 3, pred 4, truth 4: 0.75
        Assert.Equal(0.75, f1, 12);
        Assert.Equal(new Interval(f1, f1), fog.Intervals[0][(int)BootstrapStatistic.F1]);
        double diff = f1 - results[1].ByTag["fog"].IouF1.At(IouThreshold.Half).F1;
        Assert.Equal(new Interval(diff, diff), fog.Paired(0, 1, (int)BootstrapStatistic.F1, 0.95));
        Assert.Equal(2, byTag["sun"].Units);
    }
}
