namespace LaneBaseline.Core.Geometry;

/// <summary>Published road-design limits used by plausibility rules (sources in docs/checks.md).</summary>
public static class RoadGeometry
{
    /// <summary>Narrowest plausible lane width, m (docs/checks.md: band ~2.7-3.75 m, derived from AASHTO/FHWA and DMRB TD 27/96).</summary>
    public const double MinLaneWidthM = 2.7;

    /// <summary>Widest plausible lane width, m (same source).</summary>
    public const double MaxLaneWidthM = 3.75;

    /// <summary>
    /// Minimum curve radius for a design speed: <c>R = V² / (127 (e + f))</c>, V in km/h, R in m, e superelevation,
    /// f side friction factor (AASHTO Green Book, Sec. 3.3).
    /// </summary>
    public static double MinimumCurveRadiusM(double speedKmh, double superelevation, double sideFriction)
    {
        double d = superelevation + sideFriction;
        if (!(d > 0) || !(speedKmh > 0))
        {
            throw new ArgumentOutOfRangeException(nameof(speedKmh), "speed and e + f must be positive");
        }

        return speedKmh * speedKmh / (127.0 * d);
    }
}
