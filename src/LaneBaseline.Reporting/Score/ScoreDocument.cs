namespace LaneBaseline.Reporting.Score;

/// <summary>A parsed <c>score --json</c> document.</summary>
/// <param name="Systems">Systems in file order.</param>
/// <param name="Paired">Paired comparisons (empty for one system).</param>
/// <param name="Settings">The effective settings, flattened to dotted keys in file order.</param>
public sealed record ScoreDocument(
    IReadOnlyList<SystemResult> Systems,
    IReadOnlyList<PairedResult> Paired,
    IReadOnlyList<KeyValuePair<string, string>> Settings)
{
    /// <summary>A setting's value text, or null.</summary>
    public string? Setting(string key) => Settings.FirstOrDefault(kv => kv.Key == key).Value;
}
