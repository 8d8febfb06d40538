namespace LaneBaseline.Cli.Commands;

/// <summary>What a tune run measured (objective values).</summary>
internal sealed record TuneSummary(double BaseTuning, double TunedTuning, double BaseHoldout, double TunedHoldout, int TuningFrames, int HoldoutFrames, bool Overlap);
