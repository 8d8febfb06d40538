namespace LaneBaseline.Core.Audit;

/// <summary>A rule's catalogue entry: stable id, short name, severity, limit and where the limit comes from.</summary>
/// <param name="Id">Stable id; never reused for another meaning.</param>
/// <param name="Name">Short kebab-case name.</param>
/// <param name="Severity">Severity of its findings.</param>
/// <param name="Limit">The limit in words, with its default.</param>
/// <param name="Source">Where the limit comes from (rows of docs/checks.md, or "common practice").</param>
public sealed record AuditRuleInfo(string Id, string Name, AuditSeverity Severity, string Limit, string Source);

/// <summary>
/// The audit rules. Ids are our own: <c>LBA-I</c> image geometry, <c>LBA-G</c> ground geometry (with a camera
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

    /// <summary>Every rule, in id order.</summary>
    public static IReadOnlyList<AuditRuleInfo> All { get; } =
    [
        new(LanesCross, "lanes-cross", AuditSeverity.Error, "x-order of two lanes flips by more than 2 px on both sides, below the horizon",
            "parallel ground curves project to non-crossing image curves below the horizon (pinhole projection; Hartley & Zisserman, 2nd ed.); 2 px label noise: common practice"),
        new(FoldBack, "fold-back", AuditSeverity.Error, "y rises again by more than max(2 px, 1 % of the frame height) along the near-to-far point order",
            "lane-file spec: points near to far, y decreasing; a ground curve ahead of the camera is monotone in image row (common practice)"),
        new(AboveHorizon, "above-horizon", AuditSeverity.Error, "a point more than 3 % of the frame height above the horizon row (--horizon-row, else the lanes' vanishing point)",
            "the ground plane images entirely below the horizon (docs/checks.md camera rows: horizon v = 325.08 at 2° pitch); 3 % fit allowance: common practice"),
        new(ShortLane, "short-lane", AuditSeverity.Warning, "polyline length under max(20 px, 5 % of the frame height)",
            "common practice: a fragment that short is clutter, not a marking boundary (docs/metrics.md samples rows every 10 px)"),
        new(NearDuplicate, "near-duplicate", AuditSeverity.Warning, "median |dx| under the metric lane width round(30*width/1640) over at least half the shorter lane",
            "docs/metrics.md: two lanes closer than one rasterised lane width overlap heavily in the IoU metric (derived)"),
        new(SlotOrder, "slot-order", AuditSeverity.Error, "slot order contradicts x order by more than 2 px at the nearest common row, or a slot repeats",
            "lane-file spec: slot -1 left ego boundary, +1 right, ±2 next out"),
        new(WidthRatio, "width-ratio", AuditSeverity.Warning, "ratio of neighbouring lane widths at the same row above 3.75/2.7 x 1.05 = 1.458",
            "docs/checks.md lane widths: plausible band 2.7-3.75 m (AASHTO / FHWA, DMRB TD 27/96); image widths at one row scale with ground widths on a flat road (pinhole projection); 5 % label allowance: common practice"),
        new(Kink, "kink", AuditSeverity.Error, "a lane's heading on the road turns between two pieces of >= 4 m (within 60 m ahead) by more than (piece length) / R_min + 3 deg, R_min = V^2 / (127 (e + f)) of --design-speed-kmh; road plane from the camera, else from the horizon with f = frame width and a 1.5 m camera height",
            "AASHTO Green Book Sec. 3.3 (docs/checks.md worked example: 393.7 m at 100 km/h); a curve of radius R turns by s / R over a length s (geometry); 3 deg label-noise allowance: common practice; 1.5 m camera height and 53 deg field of view: from memory"),
        new(LateralJump, "lateral-jump", AuditSeverity.Error, "near-end lateral move above 3 m/s x dt + 0.15 m, metres from an assumed 3.5 m lane width at that row",
            "matched by position, not slot (slots renumber in a lane change); assumption: a vehicle moves sideways at most 3 m/s (well above a lane change; from memory); 3.5 m lane: docs/checks.md band 3.50-3.75 m (DMRB TD 27/96); 0.15 m label noise: common practice"),
        new(Flicker, "flicker", AuditSeverity.Warning, "a lane missing in one frame but present in the frames before and after (or the reverse), matched within half a lane width",
            "lane markings persist over 1/fps s at road speeds (common practice)"),
        new(FrameGap, "frame-gap", AuditSeverity.Warning, "a numbered sequence skips frame numbers",
            "common practice: a detector must write one record per frame (docs/cli.md, docs/lane-file.md)"),
        new(GroundLaneWidth, "ground-lane-width", AuditSeverity.Error, "lane width at 10 m ahead outside 2.5-3.95 m (band 2.7-3.75 m with 0.2 m allowance); pairs under 0.5 m count as a double line",
            "docs/checks.md: lanes 2.7 m (low-speed rural) to 3.66-3.75 m (AASHTO / FHWA; DMRB TD 27/96); double-line spacing 0.10-0.18 m (Vienna Convention Annex 2); allowance: common practice"),
        new(GroundCurvature, "ground-curvature", AuditSeverity.Error, "radius of a quadratic fit 3-60 m ahead below V^2 / (127 (e + f)): 393.7 m at 100 km/h, e 0.08, f 0.12 (--design-speed-kmh)",
            "AASHTO Green Book Sec. 3.3 (docs/checks.md worked example); R of a quadratic fit: calculus (docs/checks.md)"),
        new(GroundParallel, "ground-parallel", AuditSeverity.Warning, "a lane's width changes by more than 0.5 m between 10 m and 30 m ahead",
            "common practice: lane widths change only over long tapers; 0.5 m over 20 m is a 1:40 taper (from memory)"),
        new(BaselineDisagreement, "baseline-disagreement", AuditSeverity.Warning, "F1 at IoU 0.50 against the baseline's confident lanes (score >= 0.5) under 0.5",
            "rasterised-IoU F1 (docs/metrics.md; common practice in the lane-detection literature) with the baseline as reference"),
    ];

    /// <summary>Looks a rule up by id.</summary>
    public static AuditRuleInfo Get(string id) => All.First(r => r.Id == id);
}
