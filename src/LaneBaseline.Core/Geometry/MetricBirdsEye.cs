namespace LaneBaseline.Core.Geometry;

/// <summary>
/// The metric bird's-eye view of a <see cref="CameraModel"/>: a top-down image of the ground plane in which one pixel
/// is <c>metresPerPixel</c> metres along both axes, so widths and lane spacings read directly in metres.
/// </summary>
/// <remarks>
/// Bird's-eye pixel (x, y), y down, width W and height H pixels, scale s m/px. Column x is the ground's lateral
/// offset Y (left positive): x = (W − 1)/2 − Y/s, so the camera's column is the centre one. Row y is the distance
/// ahead X: y = (H − 1) − (X − X_near)/s, so the bottom row is X_near metres ahead and the top row
/// X_near + (H − 1)·s. Lines parallel to the vehicle (constant Y) are vertical columns; parallel lines keep their
/// spacing. The image-to-bird's-eye homography is the ground-to-bird's-eye similarity composed with the camera's
/// undistorted image-to-ground homography (plane-induced homography, Hartley &amp; Zisserman, Multiple View Geometry,
/// 2nd ed., 2004, Sec. 13.1); it is solved from the four corners of the ground rectangle and their images.
/// </remarks>
public static class MetricBirdsEye
{
    /// <summary>Ground point (metres) to bird's-eye pixel.</summary>
    public static (double X, double Y) GroundToPixel(double groundXM, double groundYM, double metresPerPixel, double nearXM, int width, int height)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(metresPerPixel);
        return (((width - 1) / 2.0) - (groundYM / metresPerPixel), (height - 1) - ((groundXM - nearXM) / metresPerPixel));
    }

    /// <summary>
    /// Distance ahead (metres) of the ground seen by the bottom image row at the principal column: the natural near
    /// edge of the metric view.
    /// </summary>
    public static double BottomRowDistance(CameraModel camera)
    {
        ArgumentNullException.ThrowIfNull(camera);
        (double x, _) = camera.ImageToGround(camera.Cx, camera.ImageHeight - 1);
        return x > 0 ? x : throw new ArgumentOutOfRangeException(nameof(camera), "the bottom image row does not see the ground ahead");
    }

    /// <summary>
    /// The homography from undistorted image pixels to the metric bird's-eye view of <paramref name="width"/> ×
    /// <paramref name="height"/> pixels at <paramref name="metresPerPixel"/>, whose bottom row is
    /// <paramref name="nearXM"/> metres ahead.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">The ground rectangle reaches behind the camera.</exception>
    public static PlaneHomography ImageToBirdsEye(CameraModel camera, double metresPerPixel, double nearXM, int width, int height)
    {
        ArgumentNullException.ThrowIfNull(camera);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(metresPerPixel);
        ArgumentOutOfRangeException.ThrowIfLessThan(width, 2);
        ArgumentOutOfRangeException.ThrowIfLessThan(height, 2);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(nearXM);
        double horizon = camera.HorizonRowAtCentre();
        Matrix3 g2i = camera.ToProjection().GroundToImage;
        double farX = nearXM + ((height - 1) * metresPerPixel);
        double halfY = (width - 1) / 2.0 * metresPerPixel;
        // Corners of the ground rectangle: far-left, far-right, near-right, near-left (Y left positive).
        ReadOnlySpan<double> ground = [farX, halfY, farX, -halfY, nearXM, -halfY, nearXM, halfY];
        Span<double> image = stackalloc double[8];
        Span<double> bev = stackalloc double[8];
        for (int k = 0; k < 4; k++)
        {
            double gx = ground[2 * k], gy = ground[(2 * k) + 1];
            if (!TryMap(g2i, gx, gy, out image[2 * k], out image[(2 * k) + 1]) || image[(2 * k) + 1] <= horizon)
            {
                throw new ArgumentOutOfRangeException(nameof(nearXM), "the metric view reaches behind the camera");
            }

            (bev[2 * k], bev[(2 * k) + 1]) = GroundToPixel(gx, gy, metresPerPixel, nearXM, width, height);
        }

        return PlaneHomography.TryFromPoints(image, bev, out PlaneHomography h)
            ? h
            : throw new ArgumentOutOfRangeException(nameof(camera), "degenerate metric bird's-eye rectangle");
    }

    private static bool TryMap(Matrix3 m, double x, double y, out double u, out double v)
    {
        var h = new PlaneHomography(m.M00, m.M01, m.M02, m.M10, m.M11, m.M12, m.M20, m.M21, m.M22);
        return h.TryMap(x, y, out u, out v);
    }
}
