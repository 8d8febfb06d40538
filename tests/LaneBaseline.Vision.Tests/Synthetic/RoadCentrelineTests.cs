using LaneBaseline.Vision.Synthetic;
using Xunit;

namespace LaneBaseline.Vision.Tests.Synthetic;

public sealed class RoadCentrelineTests
{
    [Theory]
    [InlineData(90, 280)]
    [InlineData(160, 470)]
    [InlineData(300, 900)]
    public void Clothoid_CurvatureIsLinearInArcLength(double a, double radius)
    {
        // Source: standard highway geometry, clothoid κ(s) = s / A² and R·L = A²; (A, R) pairs from German RAA 2008.
        RoadPiece piece = RoadPiece.Clothoid(a, 0, 1 / radius);
        Assert.Equal(a * a, radius * piece.LengthM, 6);
        var road = new RoadCentreline([piece]);
        for (double s = 0; s <= piece.LengthM; s += piece.LengthM / 7)
        {
            Assert.Equal(s / (a * a), road.CurvatureAt(s), 12);
        }
    }

    [Fact]
    public void Clothoid_HeadingIsIntegralOfCurvature()
    {
        // Source: standard highway geometry: heading θ(s) = ∫κ = s² / (2A²) for a clothoid from κ = 0.
        const double A = 200;
        var road = new RoadCentreline([RoadPiece.Clothoid(A, 0, 1 / 400.0)]);
        foreach (double s in new[] { 10.0, 50, 99.9 })
        {
            Assert.Equal(s * s / (2 * A * A), road.Evaluate(s).Heading, 6);
        }
    }

    [Fact]
    public void Arc_PointsLieOnTheCircle()
    {
        // Source: common practice (a constant-curvature curve is a circle of radius 1/κ about its centre).
        const double R = 350;
        var road = new RoadCentreline([RoadPiece.Arc(300, R)]);
        for (double s = 0; s <= 300; s += 17.3)
        {
            (double x, double y, _) = road.Evaluate(s);
            double dist = Math.Sqrt((x * x) + ((y - R) * (y - R)));
            Assert.Equal(R, dist, 3); // centre at (0, R) for a left turn starting along +x
            Assert.Equal(R * Math.Sin(s / R), x, 3);
        }
    }

    [Fact]
    public void Offset_IsPerpendicularToTheRoad()
    {
        // Source: common practice (a lateral offset moves along the left normal (−sin θ, cos θ)).
        var road = new RoadCentreline([RoadPiece.Straight(50), RoadPiece.Arc(100, -500)]);
        (double x, double y, double h) = road.Evaluate(120);
        (double ox, double oy) = road.Offset(120, 3.5);
        Assert.Equal(3.5, Math.Sqrt(((ox - x) * (ox - x)) + ((oy - y) * (oy - y))), 9);
        Assert.Equal(0, ((ox - x) * Math.Cos(h)) + ((oy - y) * Math.Sin(h)), 9);
    }
}
