namespace LaneBaseline.Core.Metrics;

/// <summary>A prediction source to score: a display name and a lane file.</summary>
/// <param name="Name">Name used in tables, JSON and CSV.</param>
/// <param name="Path">Lane file path as the user gave it.</param>
public sealed record ScoredSystem(string Name, string Path);
