using LaneBaseline.Core.Metrics;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class DetectionCountsTests
{
    // Source: docs/metrics.md: each rate is 0 when its denominator is 0, except that a set with no truth and no
    // prediction at all scores 1.0. Hand-computed: 7 TP of 9 predictions and 8 truths -> P 7/9, R 7/8, F1 = 2PR/(P+R) = 14/17.
    [Fact]
    public void From_HandComputedCase()
    {
        DetectionCounts c = DetectionCounts.From(7, 9, 8);
        Assert.Equal((2, 1), (c.FalsePositives, c.FalseNegatives));
        Assert.Equal(7.0 / 9, c.Precision, 15);
        Assert.Equal(7.0 / 8, c.Recall, 15);
        Assert.Equal(14.0 / 17, c.F1, 12);
    }

    [Fact]
    public void From_AllEmpty_ScoresOne_AndOneSidedEmptyScoresZero()
    {
        Assert.Equal(1.0, DetectionCounts.From(0, 0, 0).F1);
        Assert.Equal((0.0, 0.0, 0.0), (DetectionCounts.From(0, 3, 0).Precision, DetectionCounts.From(0, 3, 0).Recall, DetectionCounts.From(0, 3, 0).F1));
        Assert.Equal((0.0, 0.0), (DetectionCounts.From(0, 0, 4).Precision, DetectionCounts.From(0, 0, 4).F1));
    }

    // Source: Hyndman & Fan 1996 (The American Statistician 50(4)), sample quantile definition 7, position q*(n-1): values 1..5, q = 0.25 -> 2, q = 0.1 -> 1.4.
    [Fact]
    public void Quantile_LinearInterpolation()
    {
        double[] v = [1, 2, 3, 4, 5];
        Assert.Equal(2.0, Bootstrap.Quantile(v, 0.25), 12);
        Assert.Equal(1.4, Bootstrap.Quantile(v, 0.1), 12);
    }
}
