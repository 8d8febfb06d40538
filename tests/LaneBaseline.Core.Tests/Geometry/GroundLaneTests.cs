using LaneBaseline.Core.Geometry;
using Xunit;

namespace LaneBaseline.Core.Tests.Geometry;

public sealed class GroundLaneTests
{
    [Fact]
    public void LateralAt_InterpolatesTheFirstSpanningSegment()
    {
        // Source: common practice (linear interpolation): between (10, 2) and (20, 4) the lane is at Y = 3 at X = 15.
        GroundLane lane = GroundLane.FromPoints([(10.0, 2.0), (20.0, 4.0), (30.0, 10.0)]);
        Assert.True(lane.TryLateralAt(15, out double y));
        Assert.Equal(3.0, y, 12);
        Assert.True(lane.TryLateralAt(25, out double y2));
        Assert.Equal(7.0, y2, 12);
        Assert.False(lane.TryLateralAt(31, out _));
    }

    [Fact]
    public void Curvature_OfAParabola_AndRadiusAgree()
    {
        // Source: docs/checks.md / any calculus text: for Y = aX^2 + bX + c, kappa(0) = 2a / (1 + b^2)^(3/2)
        // and R(X) = (1 + (2aX + b)^2)^(3/2) / |2a|. With a = 0.001, b = 0: kappa = 0.002 1/m, R(0) = 500 m.
        GroundLane lane = GroundLane.FromPoints(Enumerable.Range(0, 20).Select(i => (X: 5.0 + (2.0 * i), Y: (0.001 * Math.Pow(5.0 + (2.0 * i), 2)) + 1.0)));
        Assert.True(lane.TryCurvature(out double kappa));
        Assert.Equal(0.002, kappa, 9);
        Assert.True(lane.TryRadiusAtNearEnd(60, 4, 10, out double r));
        double slope = 2 * 0.001 * 5.0;
        Assert.Equal(Math.Pow(1 + (slope * slope), 1.5) / 0.002, r, 6);
    }

    [Fact]
    public void CentredAndPlainFits_Agree()
    {
        // Source: common practice: centring X is a change of variable; both solutions describe the same parabola.
        GroundLane lane = GroundLane.FromPoints(Enumerable.Range(0, 12).Select(i => (X: 3.0 + (4.5 * i), Y: (-0.0007 * Math.Pow(3.0 + (4.5 * i), 2)) + (0.03 * (3.0 + (4.5 * i))) - 1.7)));
        Assert.True(lane.TryQuadratic(3, 60, 4, 10, out double a0, out double b0));
        Assert.True(lane.TryQuadratic(3, 60, 4, 10, out double a1, out double b1, centred: true));
        Assert.Equal(-0.0007, a0, 9);
        Assert.Equal(a0, a1, 9);
        Assert.Equal(0.03, b0, 7);
        Assert.Equal(b0, b1, 7);
    }

    [Fact]
    public void TooShortOrTooFewPoints_NoFit()
    {
        GroundLane lane = GroundLane.FromPoints([(5.0, 0.0), (6.0, 0.1), (7.0, 0.3), (8.0, 0.6)]);
        Assert.False(lane.TryCurvature(out _)); // span 3 m < 10 m
        Assert.False(GroundLane.FromPoints([(5.0, 0.0), (20.0, 0.1), (40.0, 0.3)]).TryCurvature(out _)); // 3 points < 4
    }
}
