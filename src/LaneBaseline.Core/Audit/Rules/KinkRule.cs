using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// Rule <c>LBA-I08</c> (kink): a lane whose direction on the road turns faster than the sharpest curve the
/// design speed allows. Roads have no corners: a curve of radius R turns a lane's heading by s / R over a length s,
/// and the curve-radius rule's design speed gives the smallest R (V² / (127 (e + f)), AASHTO Green Book Sec. 3.3).
/// </summary>
/// <remarks>
/// Each lane's points below the horizon are mapped to the road plane (flat road, small pitch): a point at row y and
/// column x lies Z = h·f / (y − y_h) ahead and X = h·(x − c_x) / (y − y_h) to the side, with the camera's focal
/// length f, mount height h and principal column c_x when a camera file is given, else f = the frame width (a
/// 53° horizontal field of view), h = <see cref="AuditSettings.AssumedCameraHeightM"/> and c_x = the frame's centre
/// column (assumptions; a wrong c_x adds the same heading to every piece and cancels in a turn). Up to
/// <see cref="AuditSettings.KinkLookAheadM"/> ahead, the road-plane polyline is cut into pieces of at least
/// <see cref="AuditSettings.KinkPieceM"/>; the turn between two consecutive pieces is compared with
/// (mean piece length) / R_min + <see cref="AuditSettings.KinkAllowanceDeg"/> (the allowance absorbs label noise:
/// common practice). One finding per lane, at its sharpest turn. Pure and thread-safe.
/// </remarks>
public sealed class KinkRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.Kink, "kink", AuditSeverity.Error, "a lane's heading on the road turns between two pieces of >= 4 m (within 60 m ahead) by more than (piece length) / R_min + 3 deg, R_min = V^2 / (127 (e + f)) of --design-speed-kmh; road plane from the camera, else from the horizon with f = frame width and a 1.5 m camera height",
        "AASHTO Green Book Sec. 3.3 (docs/checks.md worked example: 393.7 m at 100 km/h); a curve of radius R turns by s / R over a length s (geometry); 3 deg label-noise allowance: common practice; 1.5 m camera height and 53 deg field of view: from memory");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <summary>Checks one frame's lanes and appends at most one finding per lane.</summary>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = frame.Lanes;
        AuditSettings settings = frame.Settings;
        int width = frame.Width;
        if (frame.Horizon is not double yh)
        {
            return;
        }

        double f = settings.Camera?.Fy ?? width;
        double h = settings.Camera?.MountHeightM ?? settings.AssumedCameraHeightM;
        double cx = settings.Camera?.Cx ?? (width / 2.0);
        double rMin = Geometry.RoadGeometry.MinimumCurveRadiusM(settings.DesignSpeedKmh, settings.Superelevation, settings.SideFriction);
        double allowance = settings.KinkAllowanceDeg * Math.PI / 180;
        var ground = new List<(double X, double Z, double Row)>();
        var pieces = new List<(double Heading, double Length, double Row)>();
        for (int i = 0; i < lanes.Count; i++)
        {
            ground.Clear();
            foreach (LanePoint p in lanes[i].Points)
            {
                double dy = p.Y - yh;
                if (dy <= 0)
                {
                    continue;
                }

                double z = h * f / dy;
                if (z <= settings.KinkLookAheadM)
                {
                    ground.Add((h * (p.X - cx) / dy, z, p.Y));
                }
            }

            Pieces(ground, settings.KinkPieceM, pieces);
            double worst = 0, worstLimit = 0, worstRow = 0;
            for (int k = 1; k < pieces.Count; k++)
            {
                double turn = Math.Abs(Math.IEEERemainder(pieces[k].Heading - pieces[k - 1].Heading, 2 * Math.PI));
                double limit = (0.5 * (pieces[k].Length + pieces[k - 1].Length) / rMin) + allowance;
                if (turn > limit && turn - limit > worst - worstLimit)
                {
                    (worst, worstLimit, worstRow) = (turn, limit, pieces[k].Row);
                }
            }

            if (worst > 0)
            {
                double deg = worst * 180 / Math.PI, limDeg = worstLimit * 180 / Math.PI;
                sink.Add(frame.Finding(this, i, null, deg, limDeg, "deg",
                    Inv($"lane {i} turns by {deg:0.#} deg on the road near row {worstRow:0}; a curve of radius {rMin:0} m (design speed {settings.DesignSpeedKmh:0} km/h) turns at most {limDeg:0.#} deg there")));
            }
        }
    }

    /// <summary>Cuts a road-plane polyline (near to far) into pieces at least <paramref name="minLength"/> long.</summary>
    private static void Pieces(List<(double X, double Z, double Row)> ground, double minLength, List<(double Heading, double Length, double Row)> pieces)
    {
        pieces.Clear();
        if (ground.Count < 2)
        {
            return;
        }

        int anchor = 0;
        for (int j = 1; j < ground.Count; j++)
        {
            double dx = ground[j].X - ground[anchor].X, dz = ground[j].Z - ground[anchor].Z;
            double length = Math.Sqrt((dx * dx) + (dz * dz));
            if (length >= minLength)
            {
                pieces.Add((Math.Atan2(dx, dz), length, ground[anchor].Row));
                anchor = j;
            }
        }
    }
}
