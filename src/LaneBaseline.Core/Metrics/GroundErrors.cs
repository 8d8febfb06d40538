using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Metric-space errors with a camera file: lanes are projected to the road plane (X forward, Y left, metres) and
/// compared where a lane-keeping engineer looks — lateral offset at look-ahead distances, ego-lane width, curvature.
/// </summary>
/// <remarks>
/// Pairs are the truth/prediction pairs that are true positives at IoU 0.50 (the Hungarian assignment of the IoU
/// metric). Lateral offset Y at distance X = d is interpolated linearly along the projected polyline (the first
/// segment that spans d); a lane that does not reach d has no value there. Ego-lane width is Y(slot −1) − Y(slot +1)
/// at 10 m, when both sides carry both slots. Curvature is that of the least-squares quadratic Y = aX² + bX + c over
/// the projected points with 3 m ≤ X ≤ 60 m (at least 4 points spanning 10 m), at X = 0:
/// κ = 2a / (1 + b²)^{3/2} (1/m).
/// </remarks>
public sealed class GroundErrors
{
    /// <summary>Default look-ahead distances in metres.</summary>
    public static IReadOnlyList<double> DefaultLookAheadM { get; } = [5, 10, 20, 30];

    /// <summary>Distance at which the ego-lane width is compared, metres.</summary>
    public const double EgoWidthAtM = 10;

    private readonly GroundProjection projection;
    private readonly double[] lookAhead;
    private readonly List<(double X, double Y)> ta = [];
    private readonly List<(double X, double Y)> pa = [];

    /// <summary>Creates the evaluator for a camera.</summary>
    public GroundErrors(CameraModel camera, IReadOnlyList<double>? lookAheadM = null)
    {
        ArgumentNullException.ThrowIfNull(camera);
        projection = camera.ToProjection();
        lookAhead = [.. lookAheadM ?? DefaultLookAheadM];
    }

    /// <summary>Look-ahead distances in metres.</summary>
    public IReadOnlyList<double> LookAheadM => lookAhead;

    /// <summary>Computes the frame's ground errors for the given true-positive pairs.</summary>
    public FrameGroundErrors Measure(IReadOnlyList<Lane> truth, IReadOnlyList<Lane> pred, IReadOnlyList<(int Truth, int Pred)> pairs)
    {
        ArgumentNullException.ThrowIfNull(truth);
        ArgumentNullException.ThrowIfNull(pred);
        ArgumentNullException.ThrowIfNull(pairs);
        var lateralSum = new double[lookAhead.Length];
        var lateralCount = new int[lookAhead.Length];
        double curvSum = 0;
        int curvCount = 0;
        foreach ((int ti, int pi) in pairs)
        {
            Project(truth[ti], ta);
            Project(pred[pi], pa);
            for (int k = 0; k < lookAhead.Length; k++)
            {
                if (TryYAt(ta, lookAhead[k], out double yt) && TryYAt(pa, lookAhead[k], out double yp))
                {
                    lateralSum[k] += Math.Abs(yp - yt);
                    lateralCount[k]++;
                }
            }

            if (TryCurvature(ta, out double kt) && TryCurvature(pa, out double kp))
            {
                curvSum += Math.Abs(kp - kt);
                curvCount++;
            }
        }

        double widthError = double.NaN;
        if (TryEgoWidth(truth, out double wt) && TryEgoWidth(pred, out double wp))
        {
            widthError = Math.Abs(wp - wt);
        }

        return new FrameGroundErrors(lateralSum, lateralCount, widthError, curvSum, curvCount);
    }

    /// <summary>Y at X = <paramref name="xM"/> on a ground polyline (first segment spanning it).</summary>
    public static bool TryYAt(List<(double X, double Y)> pts, double xM, out double y)
    {
        ArgumentNullException.ThrowIfNull(pts);
        for (int i = 0; i + 1 < pts.Count; i++)
        {
            (double x0, double y0) = pts[i];
            (double x1, double y1) = pts[i + 1];
            if (xM >= Math.Min(x0, x1) && xM <= Math.Max(x0, x1))
            {
                y = x0 == x1 ? y0 : y0 + ((xM - x0) * (y1 - y0) / (x1 - x0));
                return true;
            }
        }

        y = double.NaN;
        return false;
    }

    /// <summary>Curvature at X = 0 of the least-squares quadratic through the points with 3 m ≤ X ≤ 60 m.</summary>
    public static bool TryCurvature(List<(double X, double Y)> pts, out double kappa)
    {
        ArgumentNullException.ThrowIfNull(pts);
        kappa = double.NaN;
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0, xmin = double.MaxValue, xmax = double.MinValue;
        foreach ((double x, double y) in pts)
        {
            if (x < 3 || x > 60)
            {
                continue;
            }

            double x2 = x * x;
            s0 += 1;
            s1 += x;
            s2 += x2;
            s3 += x2 * x;
            s4 += x2 * x2;
            t0 += y;
            t1 += x * y;
            t2 += x2 * y;
            xmin = Math.Min(xmin, x);
            xmax = Math.Max(xmax, x);
        }

        if (s0 < 4 || xmax - xmin < 10)
        {
            return false;
        }

        // Normal equations [s4 s3 s2; s3 s2 s1; s2 s1 s0] (a b c)^T = (t2 t1 t0)^T, solved by Cramer's rule.
        double det = Det(s4, s3, s2, s3, s2, s1, s2, s1, s0);
        if (Math.Abs(det) < 1e-12)
        {
            return false;
        }

        double a = Det(t2, s3, s2, t1, s2, s1, t0, s1, s0) / det;
        double b = Det(s4, t2, s2, s3, t1, s1, s2, t0, s0) / det;
        kappa = 2 * a / Math.Pow(1 + (b * b), 1.5);
        return true;
    }

    private static double Det(double a, double b, double c, double d, double e, double f, double g, double h, double i) =>
        (a * ((e * i) - (f * h))) - (b * ((d * i) - (f * g))) + (c * ((d * h) - (e * g)));

    private bool TryEgoWidth(IReadOnlyList<Lane> lanes, out double width)
    {
        width = double.NaN;
        Lane? left = null, right = null;
        foreach (Lane l in lanes)
        {
            if (l.Slot == -1)
            {
                left ??= l;
            }
            else if (l.Slot == 1)
            {
                right ??= l;
            }
        }

        if (left is null || right is null)
        {
            return false;
        }

        Project(left, ta);
        if (!TryYAt(ta, EgoWidthAtM, out double yl))
        {
            return false;
        }

        Project(right, ta);
        if (!TryYAt(ta, EgoWidthAtM, out double yr))
        {
            return false;
        }

        width = yl - yr;
        return true;
    }

    private void Project(Lane lane, List<(double X, double Y)> into)
    {
        into.Clear();
        foreach (LanePoint p in lane.Points)
        {
            if (projection.TryImageToGround(p.X, p.Y, out double x, out double y))
            {
                into.Add((x, y));
            }
        }
    }
}

/// <summary>One frame's metric-space error sums.</summary>
/// <param name="LateralAbsSumM">Σ |ΔY| per look-ahead distance, metres.</param>
/// <param name="LateralCount">Pairs with a value per look-ahead distance.</param>
/// <param name="EgoWidthAbsErrorM">|ΔW| of the ego lane at 10 m, or NaN.</param>
/// <param name="CurvatureAbsSum">Σ |Δκ| over pairs, 1/m.</param>
/// <param name="CurvatureCount">Pairs with a curvature on both sides.</param>
public sealed record FrameGroundErrors(double[] LateralAbsSumM, int[] LateralCount, double EgoWidthAbsErrorM, double CurvatureAbsSum, int CurvatureCount);
