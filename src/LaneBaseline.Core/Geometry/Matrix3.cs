namespace LaneBaseline.Core.Geometry;

/// <summary>A 3x3 matrix in row-major order (used for homographies and rotations); allocation-free.</summary>
public readonly record struct Matrix3(
    double M00, double M01, double M02,
    double M10, double M11, double M12,
    double M20, double M21, double M22)
{
    /// <summary>The identity matrix.</summary>
    public static Matrix3 Identity => new(1, 0, 0, 0, 1, 0, 0, 0, 1);

    /// <summary>Builds a matrix from nine row-major values.</summary>
    public static Matrix3 FromRowMajor(IReadOnlyList<double> v)
    {
        ArgumentNullException.ThrowIfNull(v);
        if (v.Count != 9)
        {
            throw new ArgumentException("a 3x3 matrix needs 9 values", nameof(v));
        }

        return new Matrix3(v[0], v[1], v[2], v[3], v[4], v[5], v[6], v[7], v[8]);
    }

    /// <summary>The nine values in row-major order.</summary>
    public double[] ToRowMajor() => [M00, M01, M02, M10, M11, M12, M20, M21, M22];

    /// <summary>Matrix product a·b.</summary>
    public static Matrix3 Multiply(Matrix3 a, Matrix3 b) => new(
        (a.M00 * b.M00) + (a.M01 * b.M10) + (a.M02 * b.M20),
        (a.M00 * b.M01) + (a.M01 * b.M11) + (a.M02 * b.M21),
        (a.M00 * b.M02) + (a.M01 * b.M12) + (a.M02 * b.M22),
        (a.M10 * b.M00) + (a.M11 * b.M10) + (a.M12 * b.M20),
        (a.M10 * b.M01) + (a.M11 * b.M11) + (a.M12 * b.M21),
        (a.M10 * b.M02) + (a.M11 * b.M12) + (a.M12 * b.M22),
        (a.M20 * b.M00) + (a.M21 * b.M10) + (a.M22 * b.M20),
        (a.M20 * b.M01) + (a.M21 * b.M11) + (a.M22 * b.M21),
        (a.M20 * b.M02) + (a.M21 * b.M12) + (a.M22 * b.M22));

    /// <summary>Matrix product a·b.</summary>
    public static Matrix3 operator *(Matrix3 a, Matrix3 b) => Multiply(a, b);

    /// <summary>Determinant.</summary>
    public double Determinant() =>
        (M00 * ((M11 * M22) - (M12 * M21))) - (M01 * ((M10 * M22) - (M12 * M20))) + (M02 * ((M10 * M21) - (M11 * M20)));

    /// <summary>Inverse by the adjugate; throws when the matrix is singular.</summary>
    public Matrix3 Inverse()
    {
        double det = Determinant();
        if (Math.Abs(det) < 1e-300 || !double.IsFinite(det))
        {
            throw new InvalidOperationException("matrix is singular");
        }

        double k = 1.0 / det;
        return new Matrix3(
            ((M11 * M22) - (M12 * M21)) * k,
            ((M02 * M21) - (M01 * M22)) * k,
            ((M01 * M12) - (M02 * M11)) * k,
            ((M12 * M20) - (M10 * M22)) * k,
            ((M00 * M22) - (M02 * M20)) * k,
            ((M02 * M10) - (M00 * M12)) * k,
            ((M10 * M21) - (M11 * M20)) * k,
            ((M01 * M20) - (M00 * M21)) * k,
            ((M00 * M11) - (M01 * M10)) * k);
    }

    /// <summary>Applies the matrix to the homogeneous point (x, y, 1) and returns (x', y', w').</summary>
    public (double X, double Y, double W) Apply(double x, double y) =>
        ((M00 * x) + (M01 * y) + M02, (M10 * x) + (M11 * y) + M12, (M20 * x) + (M21 * y) + M22);

    /// <summary>Applies the matrix to a 3-vector.</summary>
    public (double X, double Y, double Z) Apply(double x, double y, double z) =>
        ((M00 * x) + (M01 * y) + (M02 * z), (M10 * x) + (M11 * y) + (M12 * z), (M20 * x) + (M21 * y) + (M22 * z));

    /// <summary>
    /// Scales the matrix so that M22 is 1 (the usual normalisation of a homography); unchanged when M22 is zero or
    /// negligible (below 1e-12 of the largest entry), as for a camera looking exactly level.
    /// </summary>
    public Matrix3 NormalizedHomography()
    {
        double max = new[] { M00, M01, M02, M10, M11, M12, M20, M21, M22 }.Max(Math.Abs);
        if (Math.Abs(M22) <= 1e-12 * max)
        {
            return this;
        }

        double k = 1.0 / M22;
        return new Matrix3(M00 * k, M01 * k, M02 * k, M10 * k, M11 * k, M12 * k, M20 * k, M21 * k, 1.0);
    }
}
