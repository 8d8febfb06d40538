namespace LaneBaseline.Core.Audit;

/// <summary>How bad a finding is; <c>--fail-on</c> compares against it.</summary>
public enum AuditSeverity
{
    /// <summary>Worth a look; never fails a gate.</summary>
    Info = 0,

    /// <summary>Implausible; a likely error.</summary>
    Warning = 1,

    /// <summary>Impossible for a real road seen by a forward camera.</summary>
    Error = 2,
}
