using System.Globalization;
using System.Text.RegularExpressions;

namespace LaneBaseline.Core.Sharding;

/// <summary>
/// The one definition of a frame's <em>sequence</em>: its key without the trailing frame number
/// (<c>drive07/000123.png</c> → <c>drive07/*.png</c>, <c>clip.mp4#000123</c> → <c>clip.mp4#*</c>); a key that does
/// not end in a number is a sequence of its own. Detect and tune restart tracking when it changes, the audit's temporal
/// rules compare frames within it, and every <c>--shard</c> keeps whole sequences together.
/// </summary>
public static partial class SequenceKey
{
    /// <summary>The sequence name of a frame key (the key itself when it does not end in a number).</summary>
    public static string Of(string frameKey) => Parse(frameKey)?.Name ?? frameKey;

    /// <summary>Splits a frame key into a sequence name and frame number, or null when it does not end in a number.</summary>
    public static (string Name, long Number)? Parse(string frameKey)
    {
        ArgumentNullException.ThrowIfNull(frameKey);
        Match m = NumberedKey().Match(frameKey);
        return m.Success && long.TryParse(m.Groups[2].Value, NumberStyles.None, CultureInfo.InvariantCulture, out long n)
            ? (m.Groups[1].Value + "*" + m.Groups[3].Value, n)
            : null;
    }

    [GeneratedRegex(@"^(.*?)(\d{1,15})(\.[A-Za-z0-9]{1,5})?$", RegexOptions.CultureInvariant)]
    private static partial Regex NumberedKey();
}
