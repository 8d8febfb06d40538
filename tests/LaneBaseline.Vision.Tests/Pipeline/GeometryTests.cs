using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Random;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using MathNet.Numerics;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Pipeline;

public sealed class GeometryTests
{
    /// <summary>Ground-to-image homography of the worked pinhole example (f = 1000, (640, 360), h = 1.5 m, pitch θ).</summary>
    private static (double U, double V) Pinhole(double thetaDeg, double x, double y)
    {
        // Source: docs/checks.md, "Camera geometry": H = K·[[0,−1,0],[−sin θ,0,h cos θ],[cos θ,0,h sin θ]]
        // (Hartley & Zisserman, MVG 2nd ed., plane-induced homography).
        double t = thetaDeg * Math.PI / 180, h = 1.5;
        double a = -y, b = (-Math.Sin(t) * x) + (h * Math.Cos(t)), c = (Math.Cos(t) * x) + (h * Math.Sin(t));
        return ((1000 * a / c) + 640, (1000 * b / c) + 360);
    }

    [Theory]
    // Source: docs/checks.md table (pinhole worked example).
    [InlineData(0, 20, 0, 640, 435)]
    [InlineData(0, 20, -1.8, 730, 435)]
    [InlineData(0, 10, 0, 640, 510)]
    [InlineData(0, 40, 0, 640, 397.5)]
    [InlineData(2, 20, 0, 640, 399.9745)]
    [InlineData(2, 20, -1.8, 729.8196, 399.9745)]
    [InlineData(2, 40, 0, 640, 362.5759)]
    public void FromPoints_RecoversThePinholeHomography(double theta, double gx, double gy, double u, double v)
    {
        // Four non-collinear ground points projected with the formula define the homography; it must then reproduce
        // the published table values for other points, and its inverse must return the ground point.
        double[] ground = [8, 2, 8, -2, 50, -2, 50, 2];
        double[] image = new double[8];
        for (int k = 0; k < 4; k++)
        {
            (image[2 * k], image[(2 * k) + 1]) = Pinhole(theta, ground[2 * k], ground[(2 * k) + 1]);
        }

        Assert.True(PlaneHomography.TryFromPoints(ground, image, out PlaneHomography h));
        Assert.True(h.TryMap(gx, gy, out double pu, out double pv));
        // The table is rounded to 4 decimals: agree within half a unit of the last digit.
        Assert.Equal(u, pu, 0.00051);
        Assert.Equal(v, pv, 0.00051);
        Assert.True(h.Inverse().TryMap(pu, pv, out double bx, out double by));
        Assert.Equal(gx, bx, 6);
        Assert.Equal(gy, by, 6);
    }

    [Fact]
    public void FromPoints_Pitch2_PutsTheHorizonAtTheTableRow()
    {
        // Source: docs/checks.md: θ = 2°, horizon row v = 325.08 (a ground point far ahead).
        double[] ground = [8, 2, 8, -2, 50, -2, 50, 2];
        double[] image = new double[8];
        for (int k = 0; k < 4; k++)
        {
            (image[2 * k], image[(2 * k) + 1]) = Pinhole(2, ground[2 * k], ground[(2 * k) + 1]);
        }

        Assert.True(PlaneHomography.TryFromPoints(ground, image, out PlaneHomography h));
        Assert.True(h.TryMap(1e9, 0, out _, out double v));
        Assert.Equal(325.08, v, 0.0051);
    }

    [Fact]
    public void FromPoints_AgreesWithOpenCvGetPerspectiveTransform()
    {
        // Oracle: OpenCV's own four-point solver.
        double[] src = [100, 50, 700, 60, 900, 500, 20, 480];
        double[] dst = [0, 0, 319, 0, 319, 319, 0, 319];
        Assert.True(PlaneHomography.TryFromPoints(src, dst, out PlaneHomography h));
        Point2f[] s = [new(100, 50), new(700, 60), new(900, 500), new(20, 480)];
        Point2f[] d = [new(0, 0), new(319, 0), new(319, 319), new(0, 319)];
        using Mat cv = Cv2.GetPerspectiveTransform(s, d);
        double[] mine = [h.M00, h.M01, h.M02, h.M10, h.M11, h.M12, h.M20, h.M21, h.M22];
        for (int i = 0; i < 9; i++)
        {
            Assert.Equal(cv.At<double>(i / 3, i % 3), mine[i] / h.M22, 6);
        }
    }

    [Fact]
    public void QuadraticFit_MatchesMathNetWeightedPolynomial()
    {
        // Oracle: MathNet.Numerics Fit.PolynomialWeighted (order 2) on noisy samples of x = 0.002 y² - 0.4 y + 180.
        var rng = new SplitMix64(42);
        int n = 40;
        double[] xs = new double[n], ys = new double[n], ws = new double[n];
        for (int i = 0; i < n; i++)
        {
            ys[i] = i * 8.0;
            xs[i] = (0.002 * ys[i] * ys[i]) - (0.4 * ys[i]) + 180 + (2 * rng.NextGaussian());
            ws[i] = 1 + (10 * rng.NextDouble());
        }

        Assert.True(QuadraticFit.TryFit(xs, ys, ws, default, 320, out Quadratic q));
        double[] p = Fit.PolynomialWeighted(ys, xs, ws, 2);
        Assert.Equal(p[0], q.C, 6);
        Assert.Equal(p[1], q.B, 8);
        Assert.Equal(p[2], q.A, 10);
    }

    [Fact]
    public void LineFit_MatchesMathNetLine()
    {
        // Oracle: MathNet.Numerics Fit.Line (unweighted least squares).
        double[] ys = [0, 10, 20, 30, 40, 55];
        double[] xs = [3, 8.5, 12, 19, 22.5, 31];
        double[] ws = [1, 1, 1, 1, 1, 1];
        Assert.True(QuadraticFit.TryFitLine(xs, ys, ws, default, 100, out Quadratic q));
        (double intercept, double slope) = Fit.Line(ys, xs);
        Assert.Equal(intercept, q.C, 9);
        Assert.Equal(slope, q.B, 9);
        Assert.Equal(0, q.A);
    }
}
