using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// One frame as the rules see it: its lanes, size, position in the prediction file and the settings, plus what the
/// run adds for some families — the lanes on the road plane (with a camera), the earlier frames of its sequence and its
/// agreement with the baseline. Used by one thread at a time.
/// </summary>
public sealed class AuditFrame
{
    private double? horizon;
    private bool horizonKnown;

    /// <summary>Creates the view of one frame.</summary>
    /// <param name="record">The frame's lanes.</param>
    /// <param name="ordinal">Position of the frame in the prediction file.</param>
    /// <param name="width">Frame width, px.</param>
    /// <param name="height">Frame height, px.</param>
    /// <param name="settings">Limits; <see cref="AuditSettings.HorizonRow"/> when known (the camera's, when one is given).</param>
    public AuditFrame(LaneRecord record, long ordinal, int width, int height, AuditSettings settings)
    {
        ArgumentNullException.ThrowIfNull(record);
        ArgumentNullException.ThrowIfNull(settings);
        (Record, Ordinal, Width, Height, Settings) = (record, ordinal, width, height, settings);
    }

    /// <summary>The frame's record.</summary>
    public LaneRecord Record { get; }

    /// <summary>The frame's lanes.</summary>
    public IReadOnlyList<Lane> Lanes => Record.Lanes;

    /// <summary>Position of the frame in the prediction file.</summary>
    public long Ordinal { get; }

    /// <summary>Frame width, px.</summary>
    public int Width { get; }

    /// <summary>Frame height, px.</summary>
    public int Height { get; }

    /// <summary>Limits and assumptions.</summary>
    public AuditSettings Settings { get; }

    /// <summary>
    /// The horizon row: <see cref="AuditSettings.HorizonRow"/>, else the lanes' vanishing row
    /// (<see cref="LaneSampling.EstimateHorizon"/>), else null; computed once.
    /// </summary>
    public double? Horizon
    {
        get
        {
            if (!horizonKnown)
            {
                horizon = Settings.HorizonRow ?? LaneSampling.EstimateHorizon(Lanes, Height);
                horizonKnown = true;
            }

            return horizon;
        }
    }

    /// <summary>
    /// Each lane on the road plane between 3 and 60 m ahead (null for a lane with fewer than two points there), or null
    /// without a camera; set by <see cref="AuditRun"/> for the ground rules.
    /// </summary>
    public IReadOnlyList<GroundLane?>? Ground { get; init; }

    /// <summary>Agreement with the baseline, or null (no baseline, or no confident baseline lane in this frame).</summary>
    public BaselineAgreement? Baseline { get; init; }

    /// <summary>The frame before this one when it belongs to the same sequence with a smaller number, else null (<see cref="TemporalWindow"/>).</summary>
    public AuditFrame? Previous { get; internal set; }

    /// <summary>The frame before <see cref="Previous"/> when the three are consecutive numbers of one sequence, else null.</summary>
    public AuditFrame? Older { get; internal set; }

    /// <summary>Frame-number step from <see cref="Previous"/> (1 for consecutive frames); 0 without one.</summary>
    public long Step { get; internal set; }

    /// <summary>
    /// Each lane's points on the road plane (X forward, Y left, metres; <see cref="GroundProjection"/>) between 3 and
    /// 60 m ahead, sorted by distance; null for a lane with fewer than two points there. The ground rules read it.
    /// </summary>
    public static IReadOnlyList<GroundLane?> GroundLanesOf(LaneRecord record, GroundProjection camera)
    {
        ArgumentNullException.ThrowIfNull(record);
        const double NearM = 3, FarM = 60;
        var ground = new List<GroundLane?>(record.Lanes.Count);
        foreach (Lane lane in record.Lanes)
        {
            GroundLane g = new GroundLane().Project(lane.Points, camera, NearM, FarM, sortByDistance: true);
            ground.Add(g.Points.Count >= 2 ? g : null);
        }

        return ground;
    }

    /// <summary>A finding of <paramref name="rule"/> on this frame, with the rule's severity.</summary>
    public AuditFinding Finding(IAuditRule rule, int? lane, int? otherLane, double value, double limit, string unit, string message)
    {
        ArgumentNullException.ThrowIfNull(rule);
        return new AuditFinding(Record.Frame, Ordinal, rule.Info.Id, rule.Info.Severity, lane, otherLane, value, limit, unit, message);
    }
}
