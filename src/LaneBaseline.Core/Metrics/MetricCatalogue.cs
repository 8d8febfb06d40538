using LaneBaseline.Core.Metrics.Calibration;
using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Core.Metrics.Coverage;
using LaneBaseline.Core.Metrics.Ground;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// The metric units, in the order their parts are written (within a slot of the score JSON, and within a shard
/// state frame line). docs/metrics.md section 8 lists each (<c>MetricCatalogueTests</c>).
/// </summary>
public static class MetricCatalogue
{
    /// <summary>Every metric unit.</summary>
    public static IReadOnlyList<IMetricUnit> Units { get; } =
    [
        new IouF1Unit(),
        new PointAccuracyUnit(),
        new ConfidenceSweepUnit(),
        new CalibrationUnit(),
        new GroundUnit(),
        new CoverageUnit(),
    ];

    /// <summary>The units of a score JSON slot, in catalogue order.</summary>
    public static IReadOnlyList<IMetricUnit> InSlot(MetricJsonSlot slot) => slot == MetricJsonSlot.Tally ? TallySlot : ClosingSlot;

    private static readonly IMetricUnit[] TallySlot = [.. Units.Where(u => u.Slot == MetricJsonSlot.Tally)];
    private static readonly IMetricUnit[] ClosingSlot = [.. Units.Where(u => u.Slot == MetricJsonSlot.Closing)];
}
