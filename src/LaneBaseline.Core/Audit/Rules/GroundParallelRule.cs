using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-G03</c> ground parallelism, with a camera: a lane of plausible width (<c>LBA-G01</c> passes) changes its width
/// on the road by more than <see cref="AuditSettings.MaxWidthChangeM"/> between
/// <see cref="AuditSettings.WidthCheckDistanceM"/> and <see cref="AuditSettings.ParallelCheckDistanceM"/> ahead.
/// </summary>
public sealed class GroundParallelRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.GroundParallel, "ground-parallel", AuditSeverity.Warning, "a lane's width changes by more than 0.5 m between 10 m and 30 m ahead",
        "common practice: lane widths change only over long tapers; 0.5 m over 20 m is a 1:40 taper (from memory)");

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
        double near = settings.WidthCheckDistanceM, far = settings.ParallelCheckDistanceM;
        List<(double Y, int Lane)> present = GroundNeighbours.At(frame, ground, near);
        for (int k = 1; k < present.Count; k++)
        {
            (double yl, int left) = present[k - 1];
            (double yr, int right) = present[k];
            double width = yl - yr;
            if (width < settings.DoubleLineMaxM || width < settings.MinLaneWidthM || width > settings.MaxLaneWidthM)
            {
                continue; // a double marking, or a width LBA-G01 reports
            }

            if (ground[left]!.TryLateralAt(far, out double fl) && ground[right]!.TryLateralAt(far, out double fr))
            {
                double change = Math.Abs((fl - fr) - width);
                if (change > settings.MaxWidthChangeM)
                {
                    sink.Add(frame.Finding(this, right, left, change, settings.MaxWidthChangeM, "m",
                        Inv($"lanes {left} and {right} are {width:0.##} m apart at {near:0} m but {fl - fr:0.##} m at {far:0} m")));
                }
            }
        }
    }
}
