using LaneBaseline.Core.Geometry;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-G02</c> ground curvature, with a camera: a lane's radius on the road, from a least-squares quadratic
/// Y = aX² + bX + c over 3–60 m ahead (span at least <see cref="AuditSettings.MinCurveSpanM"/>) at its near end,
/// R = (1 + (2aX + b)²)^(3/2) / |2a|, is below the minimum radius V² / (127 (e + f)) of the design speed.
/// </summary>
public sealed class GroundCurvatureRule : IAuditRule
{
    private const double CurveFarM = 60;

    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.GroundCurvature, "ground-curvature", AuditSeverity.Error, "radius of a quadratic fit 3-60 m ahead below V^2 / (127 (e + f)): 393.7 m at 100 km/h, e 0.08, f 0.12 (--design-speed-kmh)",
        "AASHTO Green Book Sec. 3.3 (docs/checks.md worked example); R of a quadratic fit: calculus (docs/checks.md)");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Ground;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        if (frame.Ground is not { } ground)
        {
            return;
        }

        AuditSettings settings = frame.Settings;
        double rMin = RoadGeometry.MinimumCurveRadiusM(settings.DesignSpeedKmh, settings.Superelevation, settings.SideFriction);
        for (int i = 0; i < ground.Count; i++)
        {
            if (ground[i] is not { } g || !g.TryRadiusAtNearEnd(CurveFarM, 4, settings.MinCurveSpanM, out double radius))
            {
                continue;
            }

            if (radius < rMin)
            {
                sink.Add(frame.Finding(this, i, null, radius, rMin, "m",
                    Inv($"lane {i} curves with radius {radius:0} m; {settings.DesignSpeedKmh:0} km/h needs at least {rMin:0.#} m (e {settings.Superelevation}, f {settings.SideFriction})")));
            }
        }
    }
}
