namespace LaneBaseline.Vision.Synthetic;

/// <summary>An appearance condition with a severity in [0, 1]; severity 0 renders exactly like the clean scene.</summary>
/// <param name="Name">One of <see cref="KnownConditions.All"/>.</param>
/// <param name="Severity">0 (absent) to 1 (strongest).</param>
public readonly record struct RenderCondition(string Name, double Severity);
