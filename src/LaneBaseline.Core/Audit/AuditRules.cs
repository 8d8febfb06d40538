namespace LaneBaseline.Core.Audit;

/// <summary>
/// The audit rules' ids and entries; each rule is a class in <c>Audit/Rules/</c> listed in
/// <see cref="AuditRuleCatalogue"/>. Ids are our own: <c>LBA-I</c> image geometry, <c>LBA-G</c> ground geometry (with a camera
/// file), <c>LBA-T</c> temporal, <c>LBA-B</c> baseline. <see cref="Geometry.RoadGeometry"/> holds the published limits.
/// </summary>
public static class AuditRules
{
    /// <summary>Two lanes change left-to-right order below the horizon.</summary>
    public const string LanesCross = "LBA-I01";

    /// <summary>A lane's rows go back down after going up (x(y) is not a function of y).</summary>
    public const string FoldBack = "LBA-I02";

    /// <summary>A lane reaches above the horizon row.</summary>
    public const string AboveHorizon = "LBA-I03";

    /// <summary>A lane spans too few rows to be scored or trusted.</summary>
    public const string ShortLane = "LBA-I04";

    /// <summary>Two lanes lie on top of each other.</summary>
    public const string NearDuplicate = "LBA-I05";

    /// <summary>Slots contradict left-to-right order, or a slot is used twice.</summary>
    public const string SlotOrder = "LBA-I06";

    /// <summary>Neighbouring lanes' widths at the same image row differ more than published lane widths allow.</summary>
    public const string WidthRatio = "LBA-I07";

    /// <summary>A lane turns on the road faster than the sharpest curve of the design speed (a corner).</summary>
    public const string Kink = "LBA-I08";

    /// <summary>A lane moves sideways between consecutive frames faster than a vehicle can.</summary>
    public const string LateralJump = "LBA-T01";

    /// <summary>A lane vanishes for one frame or appears for one frame only.</summary>
    public const string Flicker = "LBA-T02";

    /// <summary>Frames are missing from a numbered sequence.</summary>
    public const string FrameGap = "LBA-T03";

    /// <summary>A lane's width on the ground is outside the published band.</summary>
    public const string GroundLaneWidth = "LBA-G01";

    /// <summary>A lane curves tighter than the minimum radius for the design speed.</summary>
    public const string GroundCurvature = "LBA-G02";

    /// <summary>Neighbouring boundaries are not parallel on the ground.</summary>
    public const string GroundParallel = "LBA-G03";

    /// <summary>Low agreement with the confident lanes of the classical baseline.</summary>
    public const string BaselineDisagreement = "LBA-B01";

    /// <summary>Every rule's entry, in catalogue order (<see cref="AuditRuleCatalogue.Rules"/>).</summary>
    public static IReadOnlyList<AuditRuleInfo> All { get; } = [.. AuditRuleCatalogue.Rules.Select(r => r.Info)];

    /// <summary>Looks a rule up by id.</summary>
    public static AuditRuleInfo Get(string id) => All.First(r => r.Id == id);
}
