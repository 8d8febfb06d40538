namespace LaneBaseline.Cli;

/// <summary>The caution printed in help, the README and the report.</summary>
internal static class SafetyNotice
{
    public const string Text =
        "Caution: LaneBaseline is an evaluation baseline, not a safety function. Its lanes must never steer, warn or " +
        "otherwise act in a vehicle; such functions follow ISO 26262 and ISO 21448 (SOTIF) practice, UN R79/R157 and " +
        "local regulation.";
}
