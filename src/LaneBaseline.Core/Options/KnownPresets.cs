using System.Reflection;

namespace LaneBaseline.Core.Options;

/// <summary>The presets shipped in <c>configs/presets/*.yaml</c>, embedded in this assembly.</summary>
public static class KnownPresets
{
    private const string Prefix = "LaneBaseline.Presets.";

    /// <summary>Names of the embedded presets (file names without <c>.yaml</c>), sorted.</summary>
    public static IReadOnlyList<string> Names { get; } = typeof(KnownPresets).Assembly.GetManifestResourceNames()
        .Where(n => n.StartsWith(Prefix, StringComparison.Ordinal) && n.EndsWith(".yaml", StringComparison.Ordinal))
        .Select(n => n[Prefix.Length..^".yaml".Length])
        .Order(StringComparer.Ordinal)
        .ToArray();

    /// <summary>The default preset (every key stated).</summary>
    public static PipelineOptions Default => Load("default");

    /// <summary>The embedded YAML text of a preset.</summary>
    /// <exception cref="BadInputException">No preset has that name.</exception>
    public static string GetText(string name)
    {
        Assembly assembly = typeof(KnownPresets).Assembly;
        using Stream? stream = assembly.GetManifestResourceStream(Prefix + name + ".yaml");
        if (stream is null)
        {
            throw new BadInputException(
                "unknown preset '" + name + "' (known: " + string.Join(", ", Names) + "; or give a path to a .yaml file)");
        }

        using var reader = new StreamReader(stream);
        return reader.ReadToEnd();
    }

    /// <summary>Loads and validates an embedded preset.</summary>
    public static PipelineOptions Load(string name) => PresetLoader.Parse(GetText(name), "configs/presets/" + name + ".yaml");

    /// <summary>
    /// Resolves a <c>--config</c> value: a bare name (no directory separator, no extension) is an embedded preset,
    /// anything else a YAML file path.
    /// </summary>
    /// <param name="nameOrPath">A preset name or a YAML file path.</param>
    /// <param name="notes">Receives one line when a deprecated preset name is used (for stderr); may be null.</param>
    public static PipelineOptions Resolve(string nameOrPath, TextWriter? notes = null)
    {
        ArgumentNullException.ThrowIfNull(nameOrPath);
        bool isName = nameOrPath.IndexOfAny(['/', '\\', '.']) < 0;
        if (!isName)
        {
            return PresetLoader.LoadFile(nameOrPath);
        }

        if (DeprecatedNames.TryGetValue(nameOrPath, out string? current))
        {
            notes?.WriteLine("note: preset '" + nameOrPath + "' is deprecated and will be removed in the next release; it is now called '" + current + "'");
            return Load(current);
        }

        return Load(nameOrPath);
    }

    /// <summary>Old preset names still accepted for one release, with the name that replaced them.</summary>
    public static IReadOnlyDictionary<string, string> DeprecatedNames { get; } = new Dictionary<string, string>(StringComparer.Ordinal)
    {
        // renamed 2026-12: the preset reports boundaries (at most four), not lanes
        ["four-lanes"] = "near-boundaries",
    };
}
