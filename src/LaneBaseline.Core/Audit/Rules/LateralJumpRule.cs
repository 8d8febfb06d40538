using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-T01</c> lateral jump: a lane's near end moves sideways between this frame and the previous one of its sequence
/// faster than a vehicle can (<see cref="AuditSettings.MaxLateralSpeedMps"/> × Δt + noise), metres from an assumed lane
/// width at that row. Lanes are matched within 0.75 lane widths (<see cref="LaneMatching"/>).
/// </summary>
public sealed class LateralJumpRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.LateralJump, "lateral-jump", AuditSeverity.Error, "near-end lateral move above 3 m/s x dt + 0.15 m, metres from an assumed 3.5 m lane width at that row",
        "matched by position, not slot (slots renumber in a lane change); assumption: a vehicle moves sideways at most 3 m/s (well above a lane change; from memory); 3.5 m lane: docs/checks.md band 3.50-3.75 m (DMRB TD 27/96); 0.15 m label noise: common practice");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Temporal;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        if (frame.Previous is not { } a)
        {
            return;
        }

        AuditSettings settings = frame.Settings;
        double dt = frame.Step / settings.FramesPerSecond;
        foreach ((int i, int j, double dxPx, double row) in LaneMatching.Match(a.Lanes, frame.Lanes, 0.75))
        {
            double w = LaneSampling.LaneWidthPxAt(frame.Lanes, row) ?? LaneSampling.LaneWidthPxAt(a.Lanes, row) ?? double.NaN;
            if (double.IsNaN(w))
            {
                continue;
            }

            double metres = Math.Abs(dxPx) * settings.AssumedLaneWidthM / w;
            double limit = (settings.MaxLateralSpeedMps * dt) + settings.LateralNoiseM;
            if (metres > limit)
            {
                sink.Add(frame.Finding(this, j, null, metres, limit, "m",
                    Inv($"lane {j} moved {metres:0.##} m sideways at row {row:0} since '{a.Record.Frame}' (lane {i}; {dxPx:0.#} px, lane width {w:0.#} px = {settings.AssumedLaneWidthM} m assumed)")));
            }
        }
    }
}
