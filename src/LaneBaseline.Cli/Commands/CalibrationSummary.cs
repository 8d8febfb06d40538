namespace LaneBaseline.Cli.Commands;

/// <summary>What a <c>tune --calibrate</c> run measured.</summary>
internal sealed record CalibrationSummary(int Frames, int Lanes, int Positives, double EceBefore, double EceAfter);
