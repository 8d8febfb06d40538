using System.Globalization;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// The ground-geometry rules (<c>LBA-G01</c> … <c>LBA-G03</c>), with a camera file: each lane's points below the
/// horizon are mapped to the road plane (X forward, Y left, metres; <see cref="CameraModel"/>), kept between 3 and
/// 60 m ahead, then checked for lane width, curve radius and parallelism. Pure and thread-safe.
/// </summary>
public static class GroundRules
{
    private const double NearM = 3, FarM = 60, CurveFarM = 60;

    /// <summary>Checks one frame; findings are appended in rule order.</summary>
    public static void Check(LaneRecord record, long ordinal, GroundProjection camera, AuditSettings settings, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(record);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(sink);
        var ground = new List<List<(double X, double Y)>?>();
        foreach (Lane lane in record.Lanes)
        {
            var pts = new List<(double X, double Y)>();
            foreach (LanePoint p in lane.Points)
            {
                if (camera.TryImageToGround(p.X, p.Y, out double x, out double y) && x >= NearM && x <= FarM)
                {
                    pts.Add((x, y));
                }
            }

            pts.Sort((a, b) => a.X.CompareTo(b.X));
            ground.Add(pts.Count >= 2 ? pts : null);
        }

        CheckWidthAndParallel(record, ordinal, ground, settings, sink);
        CheckCurvature(record, ordinal, ground, settings, sink);
    }

    /// <summary>Lateral position at distance x by linear interpolation, or false outside the lane's range.</summary>
    internal static bool YAt(List<(double X, double Y)> pts, double x, out double y)
    {
        for (int i = 1; i < pts.Count; i++)
        {
            if (x >= pts[i - 1].X && x <= pts[i].X)
            {
                double t = pts[i].X == pts[i - 1].X ? 0 : (x - pts[i - 1].X) / (pts[i].X - pts[i - 1].X);
                y = pts[i - 1].Y + (t * (pts[i].Y - pts[i - 1].Y));
                return true;
            }
        }

        y = double.NaN;
        return false;
    }

    private static void CheckWidthAndParallel(LaneRecord record, long ordinal, List<List<(double X, double Y)>?> ground, AuditSettings settings, List<AuditFinding> sink)
    {
        // Neighbours: lanes present at the reference distance, ordered left (large Y) to right.
        double near = settings.WidthCheckDistanceM;
        var present = new List<(double Y, int Lane)>();
        for (int i = 0; i < ground.Count; i++)
        {
            if (ground[i] is { } g && record.Lanes[i].Kind != LaneKinds.RoadEdge && YAt(g, near, out double y))
            {
                present.Add((y, i));
            }
        }

        present.Sort((a, b) => b.Y.CompareTo(a.Y));
        for (int k = 1; k < present.Count; k++)
        {
            (double yl, int left) = present[k - 1];
            (double yr, int right) = present[k];
            double width = yl - yr;
            if (width < settings.DoubleLineMaxM)
            {
                continue; // two lines of one double marking (or a duplicate: LBA-I05)
            }

            if (width < settings.MinLaneWidthM || width > settings.MaxLaneWidthM)
            {
                double limit = width < settings.MinLaneWidthM ? settings.MinLaneWidthM : settings.MaxLaneWidthM;
                sink.Add(new AuditFinding(record.Frame, ordinal, AuditRules.GroundLaneWidth, AuditRules.Get(AuditRules.GroundLaneWidth).Severity, right, left, width, limit, "m",
                    Inv($"the lane between lanes {left} and {right} is {width:0.##} m wide at {near:0} m (plausible {settings.MinLaneWidthM:0.##}-{settings.MaxLaneWidthM:0.##} m)")));
                continue;
            }

            double far = settings.ParallelCheckDistanceM;
            if (YAt(ground[left]!, far, out double fl) && YAt(ground[right]!, far, out double fr))
            {
                double change = Math.Abs((fl - fr) - width);
                if (change > settings.MaxWidthChangeM)
                {
                    sink.Add(new AuditFinding(record.Frame, ordinal, AuditRules.GroundParallel, AuditRules.Get(AuditRules.GroundParallel).Severity, right, left, change, settings.MaxWidthChangeM, "m",
                        Inv($"lanes {left} and {right} are {width:0.##} m apart at {near:0} m but {fl - fr:0.##} m at {far:0} m")));
                }
            }
        }
    }

    private static void CheckCurvature(LaneRecord record, long ordinal, List<List<(double X, double Y)>?> ground, AuditSettings settings, List<AuditFinding> sink)
    {
        double rMin = RoadGeometry.MinimumCurveRadiusM(settings.DesignSpeedKmh, settings.Superelevation, settings.SideFriction);
        for (int i = 0; i < ground.Count; i++)
        {
            List<(double X, double Y)>? g = ground[i]?.Where(p => p.X <= CurveFarM).ToList();
            if (g is null || g.Count < 4 || g[^1].X - g[0].X < settings.MinCurveSpanM)
            {
                continue;
            }

            // Least-squares Y = a X^2 + b X + c; radius at the near end R = (1 + (2aX + b)^2)^(3/2) / |2a|.
            (double a, double b) = FitQuadratic(g);
            if (a == 0)
            {
                continue;
            }

            double x0 = g[0].X;
            double slope = (2 * a * x0) + b;
            double radius = Math.Pow(1 + (slope * slope), 1.5) / Math.Abs(2 * a);
            if (radius < rMin)
            {
                sink.Add(new AuditFinding(record.Frame, ordinal, AuditRules.GroundCurvature, AuditRules.Get(AuditRules.GroundCurvature).Severity, i, null, radius, rMin, "m",
                    Inv($"lane {i} curves with radius {radius:0} m; {settings.DesignSpeedKmh:0} km/h needs at least {rMin:0.#} m (e {settings.Superelevation}, f {settings.SideFriction})")));
            }
        }
    }

    /// <summary>Least-squares quadratic Y = aX² + bX + c through the points (normal equations, X centred for conditioning).</summary>
    internal static (double A, double B) FitQuadratic(List<(double X, double Y)> pts)
    {
        double mx = pts.Average(p => p.X);
        double s0 = pts.Count, s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0;
        foreach ((double x0, double y) in pts)
        {
            double x = x0 - mx;
            s1 += x;
            s2 += x * x;
            s3 += x * x * x;
            s4 += x * x * x * x;
            t0 += y;
            t1 += x * y;
            t2 += x * x * y;
        }

        // Solve [[s4 s3 s2][s3 s2 s1][s2 s1 s0]] (a, b', c') = (t2, t1, t0) by Cramer's rule.
        double det = Det(s4, s3, s2, s3, s2, s1, s2, s1, s0);
        if (Math.Abs(det) < 1e-12)
        {
            return (0, 0);
        }

        double a = Det(t2, s3, s2, t1, s2, s1, t0, s1, s0) / det;
        double bc = Det(s4, t2, s2, s3, t1, s1, s2, t0, s0) / det;
        return (a, bc - (2 * a * mx)); // back from centred X: b = b' - 2 a mx
    }

    private static double Det(double a, double b, double c, double d, double e, double f, double g, double h, double i) =>
        (a * ((e * i) - (f * h))) - (b * ((d * i) - (f * g))) + (c * ((d * h) - (e * g)));

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
