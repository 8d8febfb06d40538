using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-G01</c> ground lane width, with a camera: the lane between two neighbouring boundaries is narrower or wider on
/// the road, <see cref="AuditSettings.WidthCheckDistanceM"/> ahead, than the published band with an allowance; pairs
/// closer than <see cref="AuditSettings.DoubleLineMaxM"/> are the two lines of one double marking.
/// </summary>
public sealed class GroundLaneWidthRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.GroundLaneWidth, "ground-lane-width", AuditSeverity.Error, "lane width at 10 m ahead outside 2.5-3.95 m (band 2.7-3.75 m with 0.2 m allowance); pairs under 0.5 m count as a double line",
        "docs/checks.md: lanes 2.7 m (low-speed rural) to 3.66-3.75 m (AASHTO / FHWA; DMRB TD 27/96); double-line spacing 0.10-0.18 m (Vienna Convention Annex 2); allowance: common practice");

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
        double near = settings.WidthCheckDistanceM;
        List<(double Y, int Lane)> present = GroundNeighbours.At(frame, ground, near);
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
                sink.Add(frame.Finding(this, right, left, width, limit, "m",
                    Inv($"the lane between lanes {left} and {right} is {width:0.##} m wide at {near:0} m (plausible {settings.MinLaneWidthM:0.##}-{settings.MaxLaneWidthM:0.##} m)")));
            }
        }
    }
}
