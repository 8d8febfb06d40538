using LaneBaseline.Core.Geometry;
using Xunit;

namespace LaneBaseline.Core.Tests.Geometry;

public sealed class MetricBirdsEyeTests
{
    private static CameraModel Level() => new()
    {
        ImageWidth = 1280,
        ImageHeight = 720,
        Fx = 1000,
        Fy = 1000,
        Cx = 640,
        Cy = 360,
        MountHeightM = 1.5,
        PitchDeg = 0,
    };

    // Source: pinhole model, hand-worked. Level camera, f = 1000 px, principal point (640, 360), height 1.5 m:
    // a ground point X ahead, Y left images at u = 640 − f·Y/X, v = 360 + f·h/X. Ground (15, 0) → (640, 460),
    // (15, 1.5) → (540, 460), (30, −1.8) → (700, 410). Metric view 0.05 m/px, 200 × 400 px, bottom row 5 m ahead:
    // x = 99.5 − Y/0.05, y = 399 − (X − 5)/0.05, so (15, 0) → (99.5, 199), (15, 1.5) → (69.5, 199),
    // (30, −1.8) → (135.5, −101).
    [Theory]
    [InlineData(640, 460, 99.5, 199)]
    [InlineData(540, 460, 69.5, 199)]
    [InlineData(700, 410, 135.5, -101)]
    public void ImagePixelOfKnownGroundPointLandsAtExpectedBirdsEyePixel(double u, double v, double bx, double by)
    {
        PlaneHomography h = MetricBirdsEye.ImageToBirdsEye(Level(), 0.05, 5, 200, 400);

        Assert.True(h.TryMap(u, v, out double x, out double y));
        Assert.Equal(bx, x, 6);
        Assert.Equal(by, y, 6);
    }

    // Source: same hand-worked pinhole example; with a 2° pitch the camera model's own projection is the reference,
    // and a ground point must land where the metric definition puts it (x = 99.5 − Y/s, y = 399 − (X − X0)/s).
    [Theory]
    [InlineData(8, 0)]
    [InlineData(12, 1.75)]
    [InlineData(20, -3.5)]
    [InlineData(24, 5.25)]
    public void PitchedCameraGroundPointsLandAtMetricPixels(double gx, double gy)
    {
        CameraModel cam = Level() with { PitchDeg = 2 };
        PlaneHomography h = MetricBirdsEye.ImageToBirdsEye(cam, 0.04, 6, 300, 500);
        (double u, double v) = cam.ProjectGroundToImage(gx, gy);

        Assert.True(h.TryMap(u, v, out double x, out double y));
        Assert.Equal(149.5 - (gy / 0.04), x, 6);
        Assert.Equal(499 - ((gx - 6) / 0.04), y, 6);
    }

    // Source: pinhole model (lines parallel to the optical axis on the ground meet at the vanishing point in the
    // image, and are parallel again on the ground plane); lane width 3.5 m is a typical value (from memory).
    [Fact]
    public void StraightLaneBoundariesBecomeVerticalColumnsThreePointFiveMetresApart()
    {
        CameraModel cam = Level() with { PitchDeg = 2 };
        const double S = 0.05;
        PlaneHomography h = MetricBirdsEye.ImageToBirdsEye(cam, S, 6, 240, 400);
        foreach (double gx in new[] { 7.0, 12, 18, 25 })
        {
            (double ul, double vl) = cam.ProjectGroundToImage(gx, 1.75);
            (double ur, double vr) = cam.ProjectGroundToImage(gx, -1.75);
            Assert.True(h.TryMap(ul, vl, out double xl, out _));
            Assert.True(h.TryMap(ur, vr, out double xr, out _));
            Assert.Equal(119.5 - 35, xl, 6);
            Assert.Equal(3.5, (xr - xl) * S, 9);
        }
    }

    // Source: hand-worked pinhole example: level camera, the bottom row v = 719 sees X = f·h/(v − cy) = 1500/359 m.
    [Fact]
    public void BottomRowDistanceFollowsThePinholeModel()
    {
        Assert.Equal(1500.0 / 359.0, MetricBirdsEye.BottomRowDistance(Level()), 9);
    }

    [Fact]
    public void ViewStartingBehindTheCameraIsRefused()
    {
        // Ground behind the camera (X <= 0) has no image below the horizon.
        Assert.Throws<ArgumentOutOfRangeException>(() => MetricBirdsEye.ImageToBirdsEye(Level(), 0.05, -1, 200, 400));
        Assert.Throws<ArgumentOutOfRangeException>(() => MetricBirdsEye.ImageToBirdsEye(Level(), 0.05, 0, 200, 400));
    }
}
