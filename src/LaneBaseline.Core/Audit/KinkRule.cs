using System.Globalization;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Audit;

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
public static class KinkRule
{
    /// <summary>Checks one frame's lanes and appends at most one finding per lane.</summary>
    /// <param name="record">The frame's lanes.</param>
    /// <param name="ordinal">Position of the frame in its file.</param>
    /// <param name="width">Frame width, px.</param>
    /// <param name="height">Frame height, px.</param>
    /// <param name="settings">Limits; <see cref="AuditSettings.HorizonRow"/> when known.</param>
    /// <param name="sink">Receives findings.</param>
    public static void Check(LaneRecord record, long ordinal, int width, int height, AuditSettings settings, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(record);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = record.Lanes;
        double? horizonRow = settings.HorizonRow ?? LaneSampling.EstimateHorizon(lanes, height);
        if (horizonRow is not double yh)
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
                sink.Add(new AuditFinding(record.Frame, ordinal, AuditRules.Kink, AuditRules.Get(AuditRules.Kink).Severity, i, null, deg, limDeg, "deg",
                    string.Create(CultureInfo.InvariantCulture,
                        $"lane {i} turns by {deg:0.#} deg on the road near row {worstRow:0}; a curve of radius {rMin:0} m (design speed {settings.DesignSpeedKmh:0} km/h) turns at most {limDeg:0.#} deg there")));
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
