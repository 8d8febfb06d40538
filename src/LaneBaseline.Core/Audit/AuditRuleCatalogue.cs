using System.Globalization;
using LaneBaseline.Core.Audit.Rules;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// The rule catalogue: every audit rule once, in the order the summary table lists them. <see cref="AuditRun"/> runs
/// the rules from here, <see cref="AuditRules.All"/> lists their entries, and a test checks it against the rule classes
/// and docs/audit.md, so a rule cannot run undocumented or be documented without running.
/// </summary>
public static class AuditRuleCatalogue
{
    /// <summary>Every rule: image geometry, temporal, ground geometry, baseline.</summary>
    public static IReadOnlyList<IAuditRule> Rules { get; } =
    [
        new LanesCrossRule(),
        new FoldBackRule(),
        new AboveHorizonRule(),
        new ShortLaneRule(),
        new NearDuplicateRule(),
        new SlotOrderRule(),
        new WidthRatioRule(),
        new KinkRule(),
        new LateralJumpRule(),
        new FlickerRule(),
        new FrameGapRule(),
        new GroundLaneWidthRule(),
        new GroundCurvatureRule(),
        new GroundParallelRule(),
        new BaselineDisagreementRule(),
    ];

    /// <summary>
    /// Runs the rules of one family on a frame, in catalogue order. The one-frame families (image, ground) keep the first
    /// <see cref="InputLimits.MaxFindingsPerFrameAndRule"/> findings of each rule and count the rest in one finding.
    /// </summary>
    public static void Check(AuditFrame frame, AuditRuleFamily family, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        bool capped = family is AuditRuleFamily.Image or AuditRuleFamily.Ground;
        foreach (IAuditRule rule in Rules)
        {
            if (rule.Family != family)
            {
                continue;
            }

            int start = sink.Count;
            rule.Check(frame, sink);
            if (capped)
            {
                Cap(sink, start);
            }
        }
    }

    /// <summary>
    /// Keeps the first <see cref="InputLimits.MaxFindingsPerFrameAndRule"/> of one rule's findings <c>sink[start..]</c> on
    /// one frame and replaces the rest by one finding that counts them.
    /// </summary>
    internal static void Cap(List<AuditFinding> sink, int start)
    {
        const int Limit = InputLimits.MaxFindingsPerFrameAndRule;
        int n = sink.Count - start;
        if (n <= Limit)
        {
            return;
        }

        AuditFinding last = sink[start + Limit - 1];
        int rest = n - Limit;
        sink.RemoveRange(start + Limit, rest);
        sink.Add(last with
        {
            Lane = null,
            OtherLane = null,
            Value = rest,
            Limit = Limit,
            Unit = "findings",
            Message = string.Create(CultureInfo.InvariantCulture, $"{rest} more findings of {last.Rule} in this frame (at most {Limit} per frame and rule are listed)"),
        });
    }
}
