namespace LaneBaseline.Core;

/// <summary>The caution printed in help, the README and the report (one text for every output).</summary>
public static class SafetyNotice
{
    /// <summary>The caution, one paragraph of plain text.</summary>
    public const string Text =
        "Caution: LaneBaseline is an evaluation baseline, not a safety function. Its lanes must never steer, warn or " +
        "otherwise act in a vehicle; such functions follow ISO 26262 and ISO 21448 (SOTIF) practice, UN R79/R157 and " +
        "local regulation.";
}
