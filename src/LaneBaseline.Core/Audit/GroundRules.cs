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
        var ground = new List<GroundLane?>();
        foreach (Lane lane in record.Lanes)
        {
            GroundLane g = new GroundLane().Project(lane.Points, camera, NearM, FarM, sortByDistance: true);
            ground.Add(g.Points.Count >= 2 ? g : null);
        }

        CheckWidthAndParallel(record, ordinal, ground, settings, sink);
        CheckCurvature(record, ordinal, ground, settings, sink);
    }

    private static void CheckWidthAndParallel(LaneRecord record, long ordinal, List<GroundLane?> ground, AuditSettings settings, List<AuditFinding> sink)
    {
        // Neighbours: lanes present at the reference distance, ordered left (large Y) to right.
        double near = settings.WidthCheckDistanceM;
        var present = new List<(double Y, int Lane)>();
        for (int i = 0; i < ground.Count; i++)
        {
            if (ground[i] is { } g && record.Lanes[i].Kind != LaneKinds.RoadEdge && g.TryLateralAt(near, out double y))
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
            if (ground[left]!.TryLateralAt(far, out double fl) && ground[right]!.TryLateralAt(far, out double fr))
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

    private static void CheckCurvature(LaneRecord record, long ordinal, List<GroundLane?> ground, AuditSettings settings, List<AuditFinding> sink)
    {
        double rMin = RoadGeometry.MinimumCurveRadiusM(settings.DesignSpeedKmh, settings.Superelevation, settings.SideFriction);
        for (int i = 0; i < ground.Count; i++)
        {
            // Least-squares Y = a X^2 + b X + c over X <= 60 m; radius at the near end R = (1 + (2aX + b)^2)^(3/2) / |2a|.
            if (ground[i] is not { } g || !g.TryRadiusAtNearEnd(CurveFarM, 4, settings.MinCurveSpanM, out double radius))
            {
                continue;
            }

            if (radius < rMin)
            {
                sink.Add(new AuditFinding(record.Frame, ordinal, AuditRules.GroundCurvature, AuditRules.Get(AuditRules.GroundCurvature).Severity, i, null, radius, rMin, "m",
                    Inv($"lane {i} curves with radius {radius:0} m; {settings.DesignSpeedKmh:0} km/h needs at least {rMin:0.#} m (e {settings.Superelevation}, f {settings.SideFriction})")));
            }
        }
    }

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
