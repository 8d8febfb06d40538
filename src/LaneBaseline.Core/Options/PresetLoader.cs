using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Buffers;
using System.Text.Json;
using System.Text.Json.Serialization;
using System.Text.Json.Serialization.Metadata;
using YamlDotNet.Core;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Core.Options;

/// <summary>
/// Reads and writes pipeline presets (YAML, camelCase keys, one section per stage). A misspelt key, a value of the
/// wrong type or an out-of-range value is a <see cref="BadInputException"/> naming <c>file:line</c> and the key.
/// </summary>
/// <remarks>
/// No reflection, so Native AOT builds read presets too: the YAML is loaded with YamlDotNet's representation model,
/// every key and scalar is checked against the option records' source-generated System.Text.Json metadata
/// (<see cref="OptionsJsonContext"/>), and the checked values are handed to the generated deserializer as JSON.
/// <see cref="ToYaml"/> writes the same text YamlDotNet's reflection serializer wrote before (a test compares them).
/// </remarks>
public static class PresetLoader
{
    /// <summary>Parses a preset (partial or complete) and validates it.</summary>
    /// <param name="yaml">Preset text.</param>
    /// <param name="file">File name used in error messages.</param>
    /// <returns>The effective options: defaults overlaid with the preset's keys.</returns>
    /// <exception cref="BadInputException">Unknown key, wrong type or out-of-range value (file:line: key: reason).</exception>
    public static PipelineOptions Parse(string yaml, string file)
    {
        ArgumentNullException.ThrowIfNull(yaml);
        YamlDepth.Check(yaml, file);
        var stream = new YamlStream();
        try
        {
            using var reader = new StringReader(yaml);
            stream.Load(reader);
        }
        catch (YamlException ex)
        {
            string reason = ex.InnerException?.Message ?? ex.Message;
            throw BadInputException.At(file, ex.Start.Line, null, reason);
        }
        catch (Exception ex) when (ex is InvalidOperationException or ArgumentException)
        {
            // YamlDotNet's scanner and loader throw these on some malformed input (found by fuzzing).
            throw BadInputException.At(file, 0, null, "invalid YAML");
        }

        PipelineOptions? options = null;
        var errors = new List<string>(); // every unknown key and bad value, so one run lists them all
        YamlNode? root = stream.Documents.Count == 0 ? null : stream.Documents[0].RootNode;
        if (root is not null && !IsNull(root))
        {
            // The generated deserializer sets every init-only property (absent ones to zero), so the JSON it gets is
            // complete: the record defaults with the preset's checked values written over them.
            using JsonDocument defaults = JsonSerializer.SerializeToDocument(new PipelineOptions(), OptionsJsonContext.Default.PipelineOptions);
            var buffer = new ArrayBufferWriter<byte>(4096);
            using (var json = new Utf8JsonWriter(buffer))
            {
                WriteObject(json, root, defaults.RootElement, OptionsJsonContext.Default.PipelineOptions, string.Empty, file, errors);
            }

            options = JsonSerializer.Deserialize(buffer.WrittenSpan, OptionsJsonContext.Default.PipelineOptions);
        }

        options ??= new PipelineOptions();
        foreach (OptionsFinding finding in options.Validate())
        {
            errors.Add(BadInputException.At(file, FindLine(yaml, finding.Key), finding.Key, finding.Problem).Message);
        }

        if (errors.Count > 0)
        {
            // In file order (a stable sort on the line number each message starts with).
            throw BadInputException.Several(errors.OrderBy(m => LineOf(m, file)));
        }

        return options;
    }

    // Writes one option record as a JSON object: each property from the YAML mapping when given there (checked
    // against its type), else from the defaults.
    // The line number of a "file:line: key: problem" message (0 when it has none).
    private static int LineOf(string message, string file)
    {
        ReadOnlySpan<char> rest = message.AsSpan(Math.Min(file.Length + 1, message.Length));
        int colon = rest.IndexOf(':');
        return colon > 0 && int.TryParse(rest[..colon], NumberStyles.None, CultureInfo.InvariantCulture, out int line) ? line : 0;
    }

    // A key with a bad value gets its default and an entry in errors, so every problem of the file is reported at once.
    private static void WriteObject(Utf8JsonWriter json, YamlNode node, JsonElement defaults, JsonTypeInfo type, string path, string file, List<string> errors)
    {
        if (node is not YamlMappingNode map)
        {
            errors.Add(BadInputException.At(file, node.Start.Line, path.Length == 0 ? null : path, "expected a mapping of keys to values").Message);
            defaults.WriteTo(json);
            return;
        }

        var given = new Dictionary<string, YamlNode>(StringComparer.Ordinal);
        foreach (KeyValuePair<YamlNode, YamlNode> kv in map.Children)
        {
            string name = (kv.Key as YamlScalarNode)?.Value ?? string.Empty;
            string key = path.Length == 0 ? name : path + "." + name;
            if (!type.Properties.Any(p => p.Name == name))
            {
                string known = string.Join(", ", type.Properties.Select(p => p.Name));
                errors.Add(BadInputException.At(file, kv.Key.Start.Line, key, $"unknown key (known here: {known})").Message);
                continue;
            }

            if (!given.TryAdd(name, kv.Value))
            {
                errors.Add(BadInputException.At(file, kv.Key.Start.Line, key, "key given twice").Message);
            }
        }

        json.WriteStartObject();
        foreach (JsonPropertyInfo property in type.Properties)
        {
            string name = property.Name, key = path.Length == 0 ? name : path + "." + name;
            json.WritePropertyName(name);
            if (!given.TryGetValue(name, out YamlNode? value))
            {
                defaults.GetProperty(name).WriteTo(json);
                continue;
            }

            var scratch = new ArrayBufferWriter<byte>(256);
            try
            {
                using (var one = new Utf8JsonWriter(scratch))
                {
                    WriteValue(one, property, value, defaults, name, key, file, errors);
                }

                json.WriteRawValue(scratch.WrittenSpan, skipInputValidation: true);
            }
            catch (BadInputException ex)
            {
                errors.Add(ex.Message);
                defaults.GetProperty(name).WriteTo(json);
            }
        }

        json.WriteEndObject();
    }

    private static void WriteValue(Utf8JsonWriter json, JsonPropertyInfo property, YamlNode value, JsonElement defaults, string name, string key, string file, List<string> errors)
    {
        if (property.PropertyType == typeof(double[]))
        {
            WriteSequence(json, value, key, file, v => WriteDouble(json, ParseDouble(v, key, file)));
        }
        else if (property.PropertyType == typeof(string[]))
        {
            WriteSequence(json, value, key, file, v => json.WriteStringValue(Scalar(v, key, file, "a name")));
        }
        else if (property.PropertyType == typeof(int))
        {
            json.WriteNumberValue(ParseInt(value, key, file));
        }
        else if (property.PropertyType == typeof(double))
        {
            WriteDouble(json, ParseDouble(value, key, file));
        }
        else if (property.PropertyType == typeof(bool))
        {
            json.WriteBooleanValue(ParseBool(value, key, file));
        }
        else if (IsNull(value))
        {
            json.WriteNullValue(); // a section with no keys: Validate reports it
        }
        else
        {
            JsonElement sectionDefaults = defaults.GetProperty(name);
            if (sectionDefaults.ValueKind == JsonValueKind.Null && property.PropertyType == typeof(CalibrationOptions))
            {
                sectionDefaults = CalibrationDefaults; // an optional section: absent by default
            }
            else if (sectionDefaults.ValueKind == JsonValueKind.Null && property.PropertyType == typeof(MetricViewOptions))
            {
                sectionDefaults = MetricDefaults; // an optional section: absent by default
            }

            WriteObject(json, value, sectionDefaults, OptionsJsonContext.Default.GetTypeInfo(property.PropertyType)!, key, file, errors);
        }
    }

    private static JsonElement CalibrationDefaults { get; } =
        JsonSerializer.SerializeToElement(new CalibrationOptions(), OptionsJsonContext.Default.CalibrationOptions);

    private static JsonElement MetricDefaults { get; } =
        JsonSerializer.SerializeToElement(new MetricViewOptions(), OptionsJsonContext.Default.MetricViewOptions);

    private static void WriteDouble(Utf8JsonWriter json, double v)
    {
        if (double.IsFinite(v))
        {
            json.WriteNumberValue(v);
        }
        else
        {
            json.WriteStringValue(v.ToString(CultureInfo.InvariantCulture)); // read back as a named literal
        }
    }

    private static void WriteSequence(Utf8JsonWriter json, YamlNode node, string key, string file, Action<YamlNode> item)
    {
        if (node is not YamlSequenceNode seq)
        {
            throw BadInputException.At(file, node.Start.Line, key, "expected a list ([a, b, ...])");
        }

        json.WriteStartArray();
        foreach (YamlNode v in seq.Children)
        {
            item(v);
        }

        json.WriteEndArray();
    }

    private static bool IsNull(YamlNode node) =>
        node is YamlScalarNode { Style: ScalarStyle.Plain, Value: null or "" or "~" or "null" or "Null" or "NULL" };

    private static string Scalar(YamlNode node, string key, string file, string expected) =>
        node is YamlScalarNode { Value: string v } && !IsNull(node) ? v
            : throw BadInputException.At(file, node.Start.Line, key, "expected " + expected);

    private static int ParseInt(YamlNode node, string key, string file)
    {
        string text = Scalar(node, key, file, "an integer");
        return int.TryParse(text, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out int v) ? v
            : throw BadInputException.At(file, node.Start.Line, key, $"'{text}' is not an integer");
    }

    private static double ParseDouble(YamlNode node, string key, string file)
    {
        string text = Scalar(node, key, file, "a number");
        return text switch
        {
            ".nan" or ".NaN" or ".NAN" => double.NaN,
            ".inf" or ".Inf" or ".INF" or "+.inf" or "+.Inf" or "+.INF" => double.PositiveInfinity,
            "-.inf" or "-.Inf" or "-.INF" => double.NegativeInfinity,
            _ => double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out double v) ? v
                : throw BadInputException.At(file, node.Start.Line, key, $"'{text}' is not a number"),
        };
    }

    private static bool ParseBool(YamlNode node, string key, string file)
    {
        string text = Scalar(node, key, file, "true or false");
        return text switch
        {
            "true" or "True" or "TRUE" => true,
            "false" or "False" or "FALSE" => false,
            _ => throw BadInputException.At(file, node.Start.Line, key, $"'{text}' is not true or false"),
        };
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
    public static string ToYaml(PipelineOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        using JsonDocument doc = JsonSerializer.SerializeToDocument(options, OptionsJsonContext.Default.PipelineOptions);
        var text = new StringBuilder(2048);
#pragma warning disable IDISP004 // misreads foreach over JsonElement.EnumerateObject(): foreach disposes the enumerator
        foreach (JsonProperty section in doc.RootElement.EnumerateObject())
        {
            if (section.Value.ValueKind == JsonValueKind.Null)
            {
                continue; // an optional section that is absent (calibration): the text stays as without it
            }

            text.Append(section.Name).Append(':');
            if (section.Value.ValueKind != JsonValueKind.Object)
            {
                text.Append(' ').Append(Leaf(section.Value)).Append('\n');
                continue;
            }

            text.Append('\n');
            foreach (JsonProperty p in section.Value.EnumerateObject())
            {
                text.Append("  ").Append(p.Name).Append(": ").Append(Leaf(p.Value)).Append('\n');
            }
        }
#pragma warning restore IDISP004

        return text.ToString();
    }

    // YamlDotNet's plain-scalar forms: round-trip numbers, lower-case booleans, YAML's names for the IEEE specials.
    private static string Leaf(JsonElement e) => e.ValueKind switch
    {
        JsonValueKind.Array => "[" + string.Join(", ", Items(e)) + "]",
        JsonValueKind.True => "true",
        JsonValueKind.False => "false",
        JsonValueKind.Number => e.GetDouble().ToString("R", CultureInfo.InvariantCulture),
        JsonValueKind.String => e.GetString() switch
        {
            "NaN" => ".nan",
            "Infinity" => ".inf",
            "-Infinity" => "-.inf",
            string other => other,
            null => string.Empty,
        },
        _ => string.Empty,
    };

    private static List<string> Items(JsonElement array)
    {
        var items = new List<string>(array.GetArrayLength());
        for (int i = 0; i < items.Capacity; i++)
        {
            items.Add(Leaf(array[i]));
        }

        return items;
    }

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
