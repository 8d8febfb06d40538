namespace LaneBaseline.Core.Tuning;

/// <summary>One tunable preset parameter and its declared range.</summary>
/// <param name="Key">Preset key path, e.g. <c>canny.lowThreshold</c>.</param>
/// <param name="Min">Lower bound (inclusive).</param>
/// <param name="Max">Upper bound (inclusive).</param>
/// <param name="WholeNumbers">Whether values are whole numbers.</param>
/// <param name="Log">Whether to sample on a logarithmic scale (positive ranges only).</param>
public sealed record TuneParameter(string Key, double Min, double Max, bool WholeNumbers = false, bool Log = false)
{
    /// <summary>Maps a unit coordinate u in [0, 1] to a value of the range (rounded for integers).</summary>
    public double FromUnit(double u)
    {
        u = Math.Clamp(u, 0, 1);
        double v = Log ? Math.Exp(Math.Log(Min) + (u * (Math.Log(Max) - Math.Log(Min)))) : Min + (u * (Max - Min));
        v = Math.Clamp(v, Min, Max);
        return WholeNumbers ? Math.Round(v, MidpointRounding.ToEven) : v;
    }

    /// <summary>Maps a value back to its unit coordinate.</summary>
    public double ToUnit(double value)
    {
        if (Max == Min)
        {
            return 0;
        }

        return Log
            ? (Math.Log(value) - Math.Log(Min)) / (Math.Log(Max) - Math.Log(Min))
            : (value - Min) / (Max - Min);
    }
}
