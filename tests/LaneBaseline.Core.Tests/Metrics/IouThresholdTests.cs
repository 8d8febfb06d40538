using LaneBaseline.Core.Metrics;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class IouThresholdTests
{
    // Source: docs/metrics.md, decisions table: "TP test: IoU >= t compared exactly on integer pixel counts
    // against the threshold parsed from its decimal string (never 0.5 + 0.05*k)".
    [Theory]
    [InlineData("0.50", 1, 2, true)]     // exactly one half
    [InlineData("0.50", 49, 99, false)]  // just below
    [InlineData("0.75", 6, 8, true)]     // exactly three quarters
    [InlineData("0.70", 7, 10, true)]    // 0.5 + 0.05*4 in doubles is 0.7000000000000001 > 0.7; the exact test keeps 7/10
    [InlineData("0.95", 95, 100, true)]
    [InlineData("0.10", 0, 0, false)]    // empty union has IoU 0
    public void IsMetBy_ComparesExactly(string threshold, long inter, long union, bool expected) =>
        Assert.Equal(expected, IouThreshold.Parse(threshold).IsMetBy(inter, union));

    [Fact]
    public void MeanF1Set_IsTenThresholdsFrom050To095()
    {
        Assert.Equal(
            ["0.50", "0.55", "0.60", "0.65", "0.70", "0.75", "0.80", "0.85", "0.90", "0.95"],
            IouThreshold.MeanF1Set.Select(t => t.Key));
        Assert.Equal("0.625", IouThreshold.Parse("0.625").Key);
        Assert.Equal("0.60", IouThreshold.Parse(".6").Key);
    }

    [Theory]
    [InlineData("0")]
    [InlineData("1.5")]
    [InlineData("-0.2")]
    [InlineData("abc")]
    public void Parse_OutOfRange_Throws(string text) => Assert.Throws<FormatException>(() => IouThreshold.Parse(text));
}
