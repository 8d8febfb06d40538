using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Metrics;
using NetTopologySuite.Geometries;
using Xunit;

namespace LaneBaseline.Vision.Tests.Metrics;

public sealed class BufferOracleTests
{
    // Oracle: NetTopologySuite 2.6 (a general-purpose geometry library). A lane of raster width w covers the polyline
    // buffered by (2*ceil(w/2)+1)/2 px with round caps, clipped to the frame. For long lanes the raster IoU must agree
    // with the analytic buffer IoU within 0.02 (edge pixels along a ~600 px boundary on a ~31 px wide band are the
    // only difference; common practice for raster-vs-vector comparisons).
    [Fact]
    public void RasterIou_MatchesBufferedPolylineIou_ForLongLanes()
    {
        var gf = new GeometryFactory();
        Polygon frame = gf.CreatePolygon([new(0, 0), new(1920, 0), new(1920, 1080), new(0, 1080), new(0, 0)]);
        using var rasterizer = new OpenCvLaneRasterizer();
        var rng = new Core.Random.SplitMix64(5);
        const int t = 30;
        double radius = ((2 * Math.Ceiling(t / 2.0)) + 1) / 2.0;
        for (int trial = 0; trial < 25; trial++)
        {
            double x0 = rng.NextDouble(300, 1300), slope = rng.NextDouble(-1.2, 1.2), shift = rng.NextDouble(0, 40);
            Lane a = Lanes.Of((x0, 589), (x0 + (slope * 200), 389), (x0 + (slope * 450) + 20, 150));
            Lane b = Lanes.Of((x0 + shift, 589), (x0 + shift + (slope * 200), 389), (x0 + shift + (slope * 450) + 20, 150));
            var inter = new long[1];
            var at = new long[1];
            var ap = new long[1];
            rasterizer.Measure(1920, 1080, t, [a], [b], inter, at, ap);
            double raster = (double)inter[0] / (at[0] + ap[0] - inter[0]);

            // Pixel centres are at integer coordinates: pixel (x, y) covers [x-0.5, x+0.5]; shift the frame accordingly.
            Geometry ga = Buffer(gf, a, radius).Intersection(Shifted(gf, frame));
            Geometry gb = Buffer(gf, b, radius).Intersection(Shifted(gf, frame));
            double analytic = ga.Intersection(gb).Area / ga.Union(gb).Area;
            Assert.InRange(raster - analytic, -0.02, 0.02);
        }
    }

    private static Geometry Buffer(GeometryFactory gf, Lane lane, double radius) =>
        gf.CreateLineString([.. lane.Points.Select(p => new Coordinate(Math.Round(p.X), Math.Round(p.Y)))]).Buffer(radius, 32);

    private static Polygon Shifted(GeometryFactory gf, Polygon frame) =>
        gf.CreatePolygon([.. frame.Coordinates.Select(c => new Coordinate(c.X - 0.5, c.Y - 0.5))]);
}
