using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Tests.Audit;

internal static class TestAccess
{
    public static double? EstimateHorizon(IReadOnlyList<Lane> lanes, int height) =>
        Core.Audit.LaneSampling.EstimateHorizon(lanes, height);
}
