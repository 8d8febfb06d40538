using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using YamlDotNet.Core;
using YamlDotNet.RepresentationModel;
using YamlDotNet.Serialization;
using YamlDotNet.Serialization.NamingConventions;

namespace LaneBaseline.Core.Options;

/// <summary>
/// Reads and writes pipeline presets (YAML, camelCase keys, one section per stage). A misspelt key, a value of the
/// wrong type or an out-of-range value is a <see cref="BadInputException"/> naming <c>file:line</c> and the key.
/// </summary>
public static class PresetLoader
{
    private static readonly IDeserializer Deserializer = new DeserializerBuilder()
        .WithNamingConvention(CamelCaseNamingConvention.Instance)
        .Build();

    private static readonly ISerializer Serializer = new SerializerBuilder()
        .WithNamingConvention(CamelCaseNamingConvention.Instance)
        .Build();

    /// <summary>Parses a preset (partial or complete) and validates it.</summary>
    /// <param name="yaml">Preset text.</param>
    /// <param name="file">File name used in error messages.</param>
    /// <returns>The effective options: defaults overlaid with the preset's keys.</returns>
    /// <exception cref="BadInputException">Unknown key, wrong type or out-of-range value (file:line: key: reason).</exception>
    public static PipelineOptions Parse(string yaml, string file)
    {
        ArgumentNullException.ThrowIfNull(yaml);
        PipelineOptions? options;
        try
        {
            options = Deserializer.Deserialize<PipelineOptions?>(yaml);
        }
        catch (YamlException ex)
        {
            string reason = ex.InnerException?.Message ?? ex.Message;
            throw BadInputException.At(file, ex.Start.Line, null, reason);
        }

        options ??= new PipelineOptions();
        IReadOnlyList<OptionsFinding> findings = options.Validate();
        if (findings.Count > 0)
        {
            var lines = new StringBuilder();
            for (int i = 0; i < findings.Count; i++)
            {
                OptionsFinding finding = findings[i];
                if (i > 0)
                {
                    lines.Append('\n');
                }

                lines.Append(BadInputException.At(file, FindLine(yaml, finding.Key), finding.Key, finding.Problem).Message);
            }

            throw new BadInputException(lines.ToString());
        }

        return options;
    }

    /// <summary>Loads a preset from a YAML file.</summary>
    /// <exception cref="BadInputException">The file is missing or unreadable, or its content is invalid.</exception>
    public static PipelineOptions LoadFile(string path)
    {
        string text;
        try
        {
            text = File.ReadAllText(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot read the preset: " + ex.Message);
        }

        return Parse(text, path);
    }

    /// <summary>Serializes the effective options to YAML (every key, stage order), the form recorded beside outputs.</summary>
    public static string ToYaml(PipelineOptions options) => Serializer.Serialize(options);

    /// <summary>Short content hash of the effective configuration: <c>sha256:</c> and the first 16 hex digits of SHA-256 over <see cref="ToYaml"/>.</summary>
    public static string Hash(PipelineOptions options)
    {
        byte[] digest = SHA256.HashData(Encoding.UTF8.GetBytes(ToYaml(options)));
        return "sha256:" + Convert.ToHexStringLower(digest.AsSpan(0, 8));
    }

    /// <summary>One-based line of a dotted key path in the YAML text, or 0 when the key is not written there.</summary>
    public static long FindLine(string yaml, string keyPath)
    {
        ArgumentNullException.ThrowIfNull(keyPath);
        var stream = new YamlStream();
        using var reader = new StringReader(yaml);
        try
        {
            stream.Load(reader);
        }
        catch (YamlException)
        {
            return 0;
        }

        if (stream.Documents.Count == 0 || stream.Documents[0].RootNode is not YamlMappingNode node)
        {
            return 0;
        }

        string[] parts = keyPath.Split('.');
        YamlNode current = node;
        long line = 0;
        foreach (string part in parts)
        {
            if (current is not YamlMappingNode map)
            {
                return line;
            }

            YamlNode? next = null;
            foreach (KeyValuePair<YamlNode, YamlNode> kv in map.Children)
            {
                if (kv.Key is YamlScalarNode s && string.Equals(s.Value, part, StringComparison.Ordinal))
                {
                    line = kv.Key.Start.Line;
                    next = kv.Value;
                    break;
                }
            }

            if (next is null)
            {
                return line;
            }

            current = next;
        }

        return line;
    }

    /// <summary>Formats a number for messages with the invariant culture.</summary>
    internal static string Num(double v) => v.ToString(CultureInfo.InvariantCulture);
}
