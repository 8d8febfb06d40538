using System.Globalization;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// An IoU threshold kept as the exact decimal it was written as, so that the true-positive test
/// <c>IoU &gt;= t</c> is decided exactly on integer pixel counts: <c>intersection * Denominator &gt;= Numerator * union</c>.
/// </summary>
/// <param name="Numerator">Decimal digits of the threshold as an integer (0.55 -> 55).</param>
/// <param name="Denominator">Power of ten (0.55 -> 100).</param>
public readonly record struct IouThreshold(long Numerator, long Denominator) : IComparable<IouThreshold>
{
    /// <summary>The default reported thresholds 0.10, 0.30, 0.50, 0.75.</summary>
    public static IReadOnlyList<IouThreshold> Reported { get; } = [Parse("0.10"), Parse("0.30"), Parse("0.50"), Parse("0.75")];

    /// <summary>The thresholds averaged by mF1: 0.50, 0.55, …, 0.95, each parsed from its decimal string.</summary>
    public static IReadOnlyList<IouThreshold> MeanF1Set { get; } =
        [.. Enumerable.Range(0, 10).Select(k => Parse((50 + (5 * k)).ToString("0", CultureInfo.InvariantCulture).Insert(0, "0.")))];

    /// <summary>The threshold 0.50 used by the gate, the intervals and the per-frame CSV.</summary>
    public static IouThreshold Half { get; } = Parse("0.50");

    /// <summary>The value as a double (for display only; comparisons use the exact fraction).</summary>
    public double Value => (double)Numerator / Denominator;

    /// <summary>The JSON key: at least two decimals ("0.50"), more when the threshold needs them.</summary>
    public string Key
    {
        get
        {
            decimal d = (decimal)Numerator / Denominator;
            string s = d.ToString("0.00########", CultureInfo.InvariantCulture);
            return s;
        }
    }

    /// <summary>Parses a decimal string in (0, 1] such as "0.5" or "0.75".</summary>
    /// <exception cref="FormatException">The text is not a plain decimal in (0, 1].</exception>
    public static IouThreshold Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        string t = text.Trim();
        if (!decimal.TryParse(t, NumberStyles.AllowDecimalPoint, CultureInfo.InvariantCulture, out decimal d) || d <= 0 || d > 1)
        {
            throw new FormatException($"'{text}' is not an IoU threshold in (0, 1]");
        }

        int dot = t.IndexOf('.', StringComparison.Ordinal);
        int decimals = dot < 0 ? 0 : t.Length - dot - 1;
        if (decimals > 9)
        {
            throw new FormatException($"'{text}' has more than 9 decimals");
        }

        long den = 1;
        for (int i = 0; i < decimals; i++)
        {
            den *= 10;
        }

        long num = (long)(d * den);
        long g = Gcd(num, den);
        return new IouThreshold(num / g, den / g);
    }

    /// <summary>The exact test <c>intersection / union &gt;= this</c>; an empty union has IoU 0.</summary>
    public bool IsMetBy(long intersection, long union) =>
        union > 0 && checked(intersection * Denominator) >= checked(Numerator * union);

    /// <inheritdoc />
    public int CompareTo(IouThreshold other) =>
        (Numerator * other.Denominator).CompareTo(other.Numerator * Denominator);

    /// <summary>Orders thresholds by value.</summary>
    public static bool operator <(IouThreshold left, IouThreshold right) => left.CompareTo(right) < 0;

    /// <summary>Orders thresholds by value.</summary>
    public static bool operator >(IouThreshold left, IouThreshold right) => left.CompareTo(right) > 0;

    /// <summary>Orders thresholds by value.</summary>
    public static bool operator <=(IouThreshold left, IouThreshold right) => left.CompareTo(right) <= 0;

    /// <summary>Orders thresholds by value.</summary>
    public static bool operator >=(IouThreshold left, IouThreshold right) => left.CompareTo(right) >= 0;

    /// <inheritdoc />
    public override string ToString() => Key;

    private static long Gcd(long a, long b)
    {
        while (b != 0)
        {
            (a, b) = (b, a % b);
        }

        return a;
    }
}
