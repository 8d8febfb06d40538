using LaneBaseline.Core.Geometry;
using LaneBaseline.Vision.Synthetic;

namespace LaneBaseline.Vision.Tests.Synthetic;

/// <summary>Hand-built scenes with known geometry for the renderer tests.</summary>
internal static class SceneFixtures
{
    public static CameraModel Camera(int width = 640, int height = 360) => CameraModel.CreateDefault(width, height);

    /// <summary>A straight, flat road with equal lanes, ego centred in lane 1, no lane change.</summary>
    public static SceneSpec Straight(MarkingStandard standard, double laneWidthM, double lineWidthM, int lanes = 3, IReadOnlyList<RenderCondition>? conditions = null) => new()
    {
        SceneSeed = 12345,
        Standard = standard,
        Pieces = [RoadPiece.Straight(3000)],
        LaneWidthsM = Enumerable.Repeat(laneWidthM, lanes).ToArray(),
        LineWidthM = lineWidthM,
        StartSM = 100,
        SpeedMps = 25,
        StartLane = 1,
        LaneOffsetM = 0,
        DashPhaseM = 0.37,
        Conditions = conditions ?? [],
    };
}
