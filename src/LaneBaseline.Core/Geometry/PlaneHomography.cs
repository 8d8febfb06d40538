namespace LaneBaseline.Core.Geometry;

/// <summary>
/// A 3×3 plane homography in managed code (row-major, unit Frobenius norm), built from four point
/// correspondences through their projective bases without allocating. Points are pixel (x, y),
/// origin top-left, y down.
/// <para>References: [1] R. Hartley, A. Zisserman, Multiple View Geometry in Computer Vision, 2nd ed., Cambridge
/// University Press, 2004, Sec. 4.1 (direct linear transformation).</para>
/// </summary>
public readonly struct PlaneHomography
{
    /// <summary>Entry (0, 0) of the row-major matrix.</summary>
    public double M00 { get; }

    /// <summary>Entry (0, 1) of the row-major matrix.</summary>
    public double M01 { get; }

    /// <summary>Entry (0, 2) of the row-major matrix.</summary>
    public double M02 { get; }

    /// <summary>Entry (1, 0) of the row-major matrix.</summary>
    public double M10 { get; }

    /// <summary>Entry (1, 1) of the row-major matrix.</summary>
    public double M11 { get; }

    /// <summary>Entry (1, 2) of the row-major matrix.</summary>
    public double M12 { get; }

    /// <summary>Entry (2, 0) of the row-major matrix.</summary>
    public double M20 { get; }

    /// <summary>Entry (2, 1) of the row-major matrix.</summary>
    public double M21 { get; }

    /// <summary>Entry (2, 2) of the row-major matrix.</summary>
    public double M22 { get; }

    /// <summary>A homography from its nine row-major entries.</summary>
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

    /// <summary>The inverse homography (adjugate; scaled to unit Frobenius norm, so H[2,2] may be 0).</summary>
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
        return Normalised(a, b, c, d, e, f, g, h, i);
    }

    /// <summary>
    /// Solves the homography mapping src[k] to dst[k] (k = 0..3, given as x0, y0, x1, y1, ...) through the projective
    /// basis of each quadruple (H = B·A⁻¹ where A, B map the canonical basis to src, dst), which also covers
    /// homographies with H[2,2] = 0. Returns false when three points are collinear.
    /// </summary>
    public static bool TryFromPoints(ReadOnlySpan<double> src, ReadOnlySpan<double> dst, out PlaneHomography h)
    {
        h = default;
        Span<double> a = stackalloc double[9];
        Span<double> b = stackalloc double[9];
        if (!TryBasis(src, a) || !TryBasis(dst, b))
        {
            return false;
        }

        Span<double> ai = stackalloc double[9];
        if (!TryInvert(a, ai))
        {
            return false;
        }

        Span<double> m = stackalloc double[9];
        for (int r = 0; r < 3; r++)
        {
            for (int c = 0; c < 3; c++)
            {
                m[(3 * r) + c] = (b[3 * r] * ai[c]) + (b[(3 * r) + 1] * ai[3 + c]) + (b[(3 * r) + 2] * ai[6 + c]);
            }
        }

        h = Normalised(m[0], m[1], m[2], m[3], m[4], m[5], m[6], m[7], m[8]);
        return true;
    }

    /// <summary>The 3×3 matrix (row-major) whose columns are λk·(xk, yk, 1), with λ solving Σ λk pk = p4.</summary>
    private static bool TryBasis(ReadOnlySpan<double> p, Span<double> basis)
    {
        Span<double> m = stackalloc double[12];
        for (int r = 0; r < 3; r++)
        {
            for (int k = 0; k < 3; k++)
            {
                m[(4 * r) + k] = r == 2 ? 1 : p[(2 * k) + r];
            }

            m[(4 * r) + 3] = r == 2 ? 1 : p[6 + r];
        }

        Span<double> lambda = stackalloc double[3];
        if (!LinearSolve.TrySolve(m, 3, lambda))
        {
            return false;
        }

        for (int r = 0; r < 3; r++)
        {
            for (int k = 0; k < 3; k++)
            {
                basis[(3 * r) + k] = (r == 2 ? 1 : p[(2 * k) + r]) * lambda[k];
            }
        }

        return true;
    }

    private static bool TryInvert(ReadOnlySpan<double> m, Span<double> inv)
    {
        double a = (m[4] * m[8]) - (m[5] * m[7]);
        double b = (m[2] * m[7]) - (m[1] * m[8]);
        double c = (m[1] * m[5]) - (m[2] * m[4]);
        double det = (m[0] * a) + (m[1] * ((m[5] * m[6]) - (m[3] * m[8]))) + (m[2] * ((m[3] * m[7]) - (m[4] * m[6])));
        if (Math.Abs(det) < 1e-300)
        {
            return false;
        }

        inv[0] = a / det; inv[1] = b / det; inv[2] = c / det;
        inv[3] = ((m[5] * m[6]) - (m[3] * m[8])) / det; inv[4] = ((m[0] * m[8]) - (m[2] * m[6])) / det; inv[5] = ((m[2] * m[3]) - (m[0] * m[5])) / det;
        inv[6] = ((m[3] * m[7]) - (m[4] * m[6])) / det; inv[7] = ((m[1] * m[6]) - (m[0] * m[7])) / det; inv[8] = ((m[0] * m[4]) - (m[1] * m[3])) / det;
        return true;
    }

    private static PlaneHomography Normalised(double a, double b, double c, double d, double e, double f, double g, double h, double i)
    {
        double n = Math.Sqrt((a * a) + (b * b) + (c * c) + (d * d) + (e * e) + (f * f) + (g * g) + (h * h) + (i * i));
        if (i < 0 || (i == 0 && g < 0))
        {
            n = -n;
        }

        return new PlaneHomography(a / n, b / n, c / n, d / n, e / n, f / n, g / n, h / n, i / n);
    }
}
