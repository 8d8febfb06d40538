namespace LaneBaseline.Core.Metrics;

/// <summary>Small shared numeric rules.</summary>
public static class Metrics
{
    /// <summary>a / b, or 0 when b is 0 (the specification's rule for every rate).</summary>
    public static double Ratio(double a, double b) => b == 0 ? 0.0 : a / b;
}
