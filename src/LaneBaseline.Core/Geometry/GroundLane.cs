using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Geometry;

/// <summary>
/// One lane on the road plane (X forward, Y left, metres; <see cref="GroundProjection"/>): the image lane's points
/// mapped to the ground, with the three questions the metric-space errors and the ground audit rules ask of it —
/// lateral offset at a distance, the least-squares quadratic (curvature, curve radius) and, over two lanes, the
/// ego-lane width. Both the metrics and the auditor use this type, so they cannot disagree about the same lane.
/// Reusable: <see cref="Project"/> refills it without allocating once its list has grown.
/// </summary>
public sealed class GroundLane
{
    private readonly List<(double X, double Y)> points = [];

    /// <summary>The projected points (metres), in the order <see cref="Project"/> left them.</summary>
    public IReadOnlyList<(double X, double Y)> Points => points;

    /// <summary>
    /// Refills the lane with every image point the projection maps to the ground with
    /// <paramref name="minXM"/> ≤ X ≤ <paramref name="maxXM"/>, in the image lane's point order, or sorted by
    /// distance (near first) when <paramref name="sortByDistance"/> is set.
    /// </summary>
    public GroundLane Project(IReadOnlyList<LanePoint> imagePoints, GroundProjection projection, double minXM = double.NegativeInfinity, double maxXM = double.PositiveInfinity, bool sortByDistance = false)
    {
        ArgumentNullException.ThrowIfNull(imagePoints);
        points.Clear();
        foreach (LanePoint p in imagePoints)
        {
            if (projection.TryImageToGround(p.X, p.Y, out double x, out double y) && x >= minXM && x <= maxXM)
            {
                points.Add((x, y));
            }
        }

        if (sortByDistance)
        {
            points.Sort((a, b) => a.X.CompareTo(b.X));
        }

        return this;
    }

    /// <summary>A ground lane from points already on the road plane (metres), kept in the given order.</summary>
    public static GroundLane FromPoints(IEnumerable<(double X, double Y)> groundPoints)
    {
        ArgumentNullException.ThrowIfNull(groundPoints);
        var lane = new GroundLane();
        lane.points.AddRange(groundPoints);
        return lane;
    }

    /// <summary>
    /// Lateral offset Y at distance X = <paramref name="xM"/> by linear interpolation on the first segment (in point
    /// order) whose closed X-range holds it; false when the lane does not reach that distance.
    /// </summary>
    public bool TryLateralAt(double xM, out double yM) => TryLateralAt(points, xM, out yM);

    /// <summary>The interpolation of <see cref="TryLateralAt(double, out double)"/> on any ground polyline.</summary>
    public static bool TryLateralAt(IReadOnlyList<(double X, double Y)> pts, double xM, out double yM)
    {
        ArgumentNullException.ThrowIfNull(pts);
        for (int i = 0; i + 1 < pts.Count; i++)
        {
            (double x0, double y0) = pts[i];
            (double x1, double y1) = pts[i + 1];
            if (xM >= Math.Min(x0, x1) && xM <= Math.Max(x0, x1))
            {
                yM = x0 == x1 ? y0 : y0 + ((xM - x0) * (y1 - y0) / (x1 - x0));
                return true;
            }
        }

        yM = double.NaN;
        return false;
    }

    /// <summary>
    /// Least-squares quadratic Y = aX² + bX + c through the points with <paramref name="minXM"/> ≤ X ≤
    /// <paramref name="maxXM"/> (normal equations solved by Cramer's rule; with <paramref name="centred"/>, X is
    /// centred on the points' mean for conditioning and b moved back to X = 0); false with fewer than
    /// <paramref name="minPoints"/> points, a span under <paramref name="minSpanM"/> or a singular system.
    /// </summary>
    public bool TryQuadratic(double minXM, double maxXM, int minPoints, double minSpanM, out double a, out double b, bool centred = false)
    {
        a = b = double.NaN;
        double mx = 0;
        if (centred)
        {
            int n = 0;
            foreach ((double x, _) in points)
            {
                if (x >= minXM && x <= maxXM)
                {
                    mx += x;
                    n++;
                }
            }

            mx = n == 0 ? 0 : mx / n;
        }

        double s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0, xmin = double.MaxValue, xmax = double.MinValue;
        foreach ((double xRaw, double y) in points)
        {
            if (xRaw < minXM || xRaw > maxXM)
            {
                continue;
            }

            double x = xRaw - mx;
            double x2 = x * x;
            s0 += 1;
            s1 += x;
            s2 += x2;
            s3 += x2 * x;
            s4 += x2 * x2;
            t0 += y;
            t1 += x * y;
            t2 += x2 * y;
            xmin = Math.Min(xmin, xRaw);
            xmax = Math.Max(xmax, xRaw);
        }

        if (s0 < minPoints || xmax - xmin < minSpanM)
        {
            return false;
        }

        // Normal equations [s4 s3 s2; s3 s2 s1; s2 s1 s0] (a b c)^T = (t2 t1 t0)^T.
        double det = Det(s4, s3, s2, s3, s2, s1, s2, s1, s0);
        if (Math.Abs(det) < 1e-12)
        {
            return false;
        }

        a = Det(t2, s3, s2, t1, s2, s1, t0, s1, s0) / det;
        b = Det(s4, t2, s2, s3, t1, s1, s2, t0, s0) / det;
        if (centred)
        {
            b -= 2 * a * mx; // back from centred X: b = b' - 2 a mx
        }

        return true;
    }

    /// <summary>
    /// Curvature at X = 0 of the least-squares quadratic over 3 m ≤ X ≤ 60 m (at least 4 points spanning 10 m):
    /// κ = 2a / (1 + b²)^{3/2}, 1/m, signed (left positive).
    /// </summary>
    public bool TryCurvature(out double kappa)
    {
        kappa = double.NaN;
        if (!TryQuadratic(3, 60, 4, 10, out double a, out double b))
        {
            return false;
        }

        kappa = 2 * a / Math.Pow(1 + (b * b), 1.5);
        return true;
    }

    /// <summary>
    /// Curve radius (m) at the nearest point of the least-squares quadratic over X ≤ <paramref name="maxXM"/>,
    /// R = (1 + (2aX + b)²)^{3/2} / |2a|; false when the fit fails or is straight (a = 0).
    /// </summary>
    public bool TryRadiusAtNearEnd(double maxXM, int minPoints, double minSpanM, out double radiusM)
    {
        radiusM = double.NaN;
        if (points.Count == 0 || !TryQuadratic(double.NegativeInfinity, maxXM, minPoints, minSpanM, out double a, out double b, centred: true) || a == 0)
        {
            return false;
        }

        double x0 = double.MaxValue;
        foreach ((double x, _) in points)
        {
            if (x <= maxXM)
            {
                x0 = Math.Min(x0, x);
            }
        }

        double slope = (2 * a * x0) + b;
        radiusM = Math.Pow(1 + (slope * slope), 1.5) / Math.Abs(2 * a);
        return true;
    }

    /// <summary>Ego-lane width Y(left) − Y(right) at <paramref name="xM"/>; false when either lane does not reach it.</summary>
    public static bool TryWidthAt(GroundLane left, GroundLane right, double xM, out double widthM)
    {
        ArgumentNullException.ThrowIfNull(left);
        ArgumentNullException.ThrowIfNull(right);
        widthM = double.NaN;
        if (!left.TryLateralAt(xM, out double yl) || !right.TryLateralAt(xM, out double yr))
        {
            return false;
        }

        widthM = yl - yr;
        return true;
    }

    private static double Det(double a, double b, double c, double d, double e, double f, double g, double h, double i) =>
        (a * ((e * i) - (f * h))) - (b * ((d * i) - (f * g))) + (c * ((d * h) - (e * g)));
}
