using System.Globalization;

namespace LaneBaseline.Core.Options;

/// <summary>Range checks shared by the options records; every check rejects NaN and infinities.</summary>
internal static class OptionsChecks
{
    public static void Range(List<OptionsFinding> findings, string key, double value, double min, double max)
    {
        if (!double.IsFinite(value) || value < min || value > max)
        {
            findings.Add(new OptionsFinding(
                key,
                string.Create(CultureInfo.InvariantCulture, $"{value} is outside the valid range [{min}, {max}]")));
        }
    }

    public static void Range(List<OptionsFinding> findings, string key, int value, int min, int max)
    {
        if (value < min || value > max)
        {
            findings.Add(new OptionsFinding(
                key,
                string.Create(CultureInfo.InvariantCulture, $"{value} is outside the valid range [{min}, {max}]")));
        }
    }

    public static void Odd(List<OptionsFinding> findings, string key, int value)
    {
        if (value % 2 == 0)
        {
            findings.Add(new OptionsFinding(key, string.Create(CultureInfo.InvariantCulture, $"{value} must be odd")));
        }
    }

    public static void Less(List<OptionsFinding> findings, string keyLow, double low, string keyHigh, double high)
    {
        if (low >= high)
        {
            findings.Add(new OptionsFinding(
                keyLow,
                string.Create(CultureInfo.InvariantCulture, $"{low} must be less than {keyHigh} ({high})")));
        }
    }
}
