namespace LaneBaseline.Core.Results;

/// <summary>
/// A lane curve x = A·y² + B·y + C (x as a function of y; pixel coordinates of the image it was fitted in,
/// origin top-left, y down).
/// </summary>
/// <param name="A">Coefficient of y², in 1/pixel.</param>
/// <param name="B">Coefficient of y (dimensionless slope dx/dy at y = 0).</param>
/// <param name="C">Offset: x at y = 0, in pixels.</param>
public readonly record struct Quadratic(double A, double B, double C)
{
    /// <summary>x at row <paramref name="y"/>.</summary>
    public double At(double y) => (((A * y) + B) * y) + C;

    /// <summary>dx/dy at row <paramref name="y"/>.</summary>
    public double SlopeAt(double y) => (2 * A * y) + B;
}
