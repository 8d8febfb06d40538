using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>The neighbouring lane pairs the ground width rules measure (shared by <c>LBA-G01</c> and <c>LBA-G03</c>).</summary>
internal static class GroundNeighbours
{
    /// <summary>
    /// Lanes (not road edges) present at <paramref name="distanceM"/> ahead, ordered left (large Y) to right, as
    /// (lateral offset Y in metres, lane index).
    /// </summary>
    public static List<(double Y, int Lane)> At(AuditFrame frame, IReadOnlyList<Geometry.GroundLane?> ground, double distanceM)
    {
        var present = new List<(double Y, int Lane)>();
        for (int i = 0; i < ground.Count; i++)
        {
            if (ground[i] is { } g && frame.Lanes[i].Kind != LaneKinds.RoadEdge && g.TryLateralAt(distanceM, out double y))
            {
                present.Add((y, i));
            }
        }

        present.Sort((a, b) => b.Y.CompareTo(a.Y));
        return present;
    }
}
