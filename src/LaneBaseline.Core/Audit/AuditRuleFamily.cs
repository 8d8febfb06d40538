namespace LaneBaseline.Core.Audit;

/// <summary>What a rule reads, which decides when <see cref="AuditRun"/> runs it.</summary>
public enum AuditRuleFamily
{
    /// <summary>One frame's lanes in image pixels (<c>LBA-I</c>); in parallel, capped per frame and rule.</summary>
    Image = 0,

    /// <summary>One frame's lanes on the road plane, with a camera (<c>LBA-G</c>, <see cref="AuditFrame.Ground"/>); in parallel, capped per frame and rule.</summary>
    Ground = 1,

    /// <summary>The frame and the frames before it in its sequence (<c>LBA-T</c>, <see cref="AuditFrame.Previous"/>); in file order, off with <c>--stills</c>.</summary>
    Temporal = 2,

    /// <summary>The frame's agreement with the baseline (<c>LBA-B</c>, <see cref="AuditFrame.Baseline"/>); with <c>--baseline</c>.</summary>
    Baseline = 3,
}
