namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// A 3×3 plane homography in managed code (row-major, H[2,2] normalised to 1), built from four point
/// correspondences by solving the 8×8 direct linear system without allocating. Points are pixel (x, y),
/// origin top-left, y down.
/// <para>References: [1] R. Hartley, A. Zisserman, Multiple View Geometry in Computer Vision, 2nd ed., Cambridge
/// University Press, 2004, Sec. 4.1 (direct linear transformation).</para>
/// </summary>
internal readonly struct PlaneHomography
{
    public readonly double M00, M01, M02, M10, M11, M12, M20, M21, M22;

    public PlaneHomography(double m00, double m01, double m02, double m10, double m11, double m12, double m20, double m21, double m22)
    {
        M00 = m00; M01 = m01; M02 = m02; M10 = m10; M11 = m11; M12 = m12; M20 = m20; M21 = m21; M22 = m22;
    }

    /// <summary>Maps a point; returns false when it falls on the line at infinity.</summary>
    public bool TryMap(double x, double y, out double u, out double v)
    {
        double w = (M20 * x) + (M21 * y) + M22;
        if (Math.Abs(w) < 1e-12)
        {
            u = v = double.NaN;
            return false;
        }

        u = ((M00 * x) + (M01 * y) + M02) / w;
        v = ((M10 * x) + (M11 * y) + M12) / w;
        return true;
    }

    /// <summary>The inverse homography (adjugate over determinant).</summary>
    public PlaneHomography Inverse()
    {
        double a = (M11 * M22) - (M12 * M21);
        double b = (M02 * M21) - (M01 * M22);
        double c = (M01 * M12) - (M02 * M11);
        double d = (M12 * M20) - (M10 * M22);
        double e = (M00 * M22) - (M02 * M20);
        double f = (M02 * M10) - (M00 * M12);
        double g = (M10 * M21) - (M11 * M20);
        double h = (M01 * M20) - (M00 * M21);
        double i = (M00 * M11) - (M01 * M10);
        double det = (M00 * a) + (M01 * d) + (M02 * g);
        double s = 1.0 / det;
        double n = i * s;
        return new PlaneHomography(a * s / n, b * s / n, c * s / n, d * s / n, e * s / n, f * s / n, g * s / n, h * s / n, 1.0);
    }

    /// <summary>
    /// Solves the homography mapping src[k] to dst[k] (k = 0..3, given as x0, y0, x1, y1, ...).
    /// Returns false when the points are degenerate (three collinear).
    /// </summary>
    public static bool TryFromPoints(ReadOnlySpan<double> src, ReadOnlySpan<double> dst, out PlaneHomography h)
    {
        Span<double> m = stackalloc double[8 * 9];
        for (int k = 0; k < 4; k++)
        {
            double x = src[2 * k], y = src[(2 * k) + 1], u = dst[2 * k], v = dst[(2 * k) + 1];
            Span<double> r1 = m.Slice(2 * k * 9, 9);
            Span<double> r2 = m.Slice(((2 * k) + 1) * 9, 9);
            r1[0] = x; r1[1] = y; r1[2] = 1; r1[3] = 0; r1[4] = 0; r1[5] = 0; r1[6] = -u * x; r1[7] = -u * y; r1[8] = u;
            r2[0] = 0; r2[1] = 0; r2[2] = 0; r2[3] = x; r2[4] = y; r2[5] = 1; r2[6] = -v * x; r2[7] = -v * y; r2[8] = v;
        }

        Span<double> sol = stackalloc double[8];
        if (!LinearSolve.TrySolve(m, 8, sol))
        {
            h = default;
            return false;
        }

        h = new PlaneHomography(sol[0], sol[1], sol[2], sol[3], sol[4], sol[5], sol[6], sol[7], 1.0);
        return true;
    }
}
