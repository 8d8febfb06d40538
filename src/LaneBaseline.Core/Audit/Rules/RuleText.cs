using System.Globalization;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>Finding messages in the invariant culture.</summary>
internal static class RuleText
{
    public static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
