namespace LaneBaseline.Vision.Synthetic;

/// <summary>An appearance condition with a severity in [0, 1]; severity 0 renders exactly like the clean scene.</summary>
/// <param name="Name">One of <see cref="KnownConditions.All"/>.</param>
/// <param name="Severity">0 (absent) to 1 (strongest).</param>
public readonly record struct RenderCondition(string Name, double Severity);

/// <summary>The named conditions the renderer can dial up one at a time.</summary>
public static class KnownConditions
{
    /// <summary>Tree, pole and bridge shadows across the road.</summary>
    public const string Shadows = "shadows";

    /// <summary>Vehicles ahead and beside that occlude markings.</summary>
    public const string Traffic = "traffic";

    /// <summary>Night: dark sky, headlights, street lights, tail lights.</summary>
    public const string Night = "night";

    /// <summary>Rain: wet road with reflections, streaks, lower contrast.</summary>
    public const string Rain = "rain";

    /// <summary>Low sun ahead: veiling glare, flare and a bright road reflection.</summary>
    public const string Glare = "glare";

    /// <summary>Worn, patchy paint.</summary>
    public const string WornPaint = "worn-paint";

    /// <summary>Cracks, sealant seams and patches on the surface.</summary>
    public const string Cracks = "cracks";

    /// <summary>Sensor noise.</summary>
    public const string Noise = "noise";

    /// <summary>Defocus and motion blur.</summary>
    public const string Blur = "blur";

    /// <summary>Strong JPEG compression artefacts.</summary>
    public const string Jpeg = "jpeg";

    /// <summary>Every condition, in the order used by the round-robin of the default scene mix.</summary>
    public static IReadOnlyList<string> All { get; } = [Shadows, Traffic, Night, Rain, Glare, WornPaint, Cracks, Noise, Blur, Jpeg];

    /// <summary>Whether <paramref name="name"/> is a known condition (exact).</summary>
    public static bool IsKnown(string name) => All.Contains(name, StringComparer.Ordinal);
}
