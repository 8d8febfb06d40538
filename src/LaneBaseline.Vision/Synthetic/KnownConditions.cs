namespace LaneBaseline.Vision.Synthetic;

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

    /// <summary>Wet road at night: street lamps and oncoming headlights mirrored as long bright streaks on the road.</summary>
    public const string WetNight = "wet-night";

    /// <summary>Dusk under sodium street lighting: an orange cast that pushes white paint towards yellow, low contrast.</summary>
    public const string SodiumDusk = "sodium-dusk";

    /// <summary>A low sun straight ahead: a backlit, darker road under a strong veil and a wide bright road reflection.</summary>
    public const string LowSun = "low-sun";

    /// <summary>Heavy paint wear with repaired patches and dark tar seams running along the lanes.</summary>
    public const string HeavyWear = "heavy-wear";

    /// <summary>Every condition, in the order used by the round-robin of the default scene mix.</summary>
    public static IReadOnlyList<string> All { get; } = [Shadows, Traffic, Night, Rain, Glare, WornPaint, Cracks, Noise, Blur, Jpeg];

    /// <summary>Opt-in conditions: only rendered when named (by <c>--conditions</c> or <c>--sweep</c>), never in the default mix.</summary>
    public static IReadOnlyList<string> OptIn { get; } = [WetNight, SodiumDusk, LowSun, HeavyWear];

    /// <summary>The default-mix conditions followed by the opt-in ones.</summary>
    public static IReadOnlyList<string> Every { get; } = [.. All, .. OptIn];

    /// <summary>Whether <paramref name="name"/> is a known condition (exact).</summary>
    public static bool IsKnown(string name) => Every.Contains(name, StringComparer.Ordinal);
}
