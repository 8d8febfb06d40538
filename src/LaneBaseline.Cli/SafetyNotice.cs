namespace LaneBaseline.Cli;

/// <summary>The caution printed in help, the README and the report; the text lives in Core so the report can use it.</summary>
internal static class SafetyNotice
{
    public const string Text = LaneBaseline.Core.SafetyNotice.Text;
}
