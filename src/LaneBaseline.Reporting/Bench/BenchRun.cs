namespace LaneBaseline.Reporting.Bench;

/// <summary>One measured configuration of <c>bench --json</c>: frame size, workers, per-stage and whole-frame cost.</summary>
/// <param name="Label">e.g. "1280x720, 1 worker".</param>
/// <param name="Stages">Stage name with median and p95 in milliseconds, in run order.</param>
/// <param name="FrameMedianMs">Whole-frame median of the pipeline, ms.</param>
/// <param name="FrameP95Ms">Whole-frame p95 of the pipeline, ms.</param>
/// <param name="FloorMedianMs">Median of the bare OpenCV primitives on the same frames, ms.</param>
/// <param name="Ratio">Pipeline/floor, median of per-frame pairs.</param>
/// <param name="FramesPerSecond">Pipeline-only throughput.</param>
/// <param name="BytesPerFrame">Managed bytes allocated per frame.</param>
public sealed record BenchRun(
    string Label,
    IReadOnlyList<(string Stage, double MedianMs, double P95Ms)> Stages,
    double FrameMedianMs,
    double FrameP95Ms,
    double FloorMedianMs,
    double Ratio,
    double FramesPerSecond,
    double BytesPerFrame);
