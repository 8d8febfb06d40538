using System.Globalization;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// One audit job: its inputs and every setting that changes a finding or an output. <c>audit --partial</c> writes it
/// whole into the state header (<see cref="AuditJobJson"/>) and <c>merge</c> reads it back whole, so every setting of
/// <see cref="AuditSettings"/> — including one added later — reaches the merged outputs, and the shards of one job are
/// compared on every one of them (<see cref="Entries"/>).
/// </summary>
public sealed record AuditJob
{
    /// <summary>Predictions as given (a mask folder, an OpenLABEL file or a lane file).</summary>
    public required string Pred { get; init; }

    /// <summary>Content hash of the predictions (<see cref="IO.ContentHash"/>); null outside a state.</summary>
    public string? PredSha256 { get; init; }

    /// <summary>Baseline predictions as given, or null.</summary>
    public string? Baseline { get; init; }

    /// <summary>Content hash of the baseline, or null (no baseline, or outside a state).</summary>
    public string? BaselineSha256 { get; init; }

    /// <summary>Fewest mask rows a lane id must cover to become a lane (mask-folder inputs; default 10).</summary>
    public int MinMaskRows { get; init; } = 10;

    /// <summary>The rules' settings, the camera included.</summary>
    public required AuditSettings Settings { get; init; }

    /// <summary>
    /// The job as (name, canonical JSON value) pairs, one per leaf of its serialised form (<c>settings.fps</c>-style
    /// dotted names, in declaration order): the serialiser walks every property, so a new setting is compared without
    /// anyone listing it.
    /// </summary>
    public IReadOnlyList<KeyValuePair<string, string>> Entries()
    {
        using JsonDocument doc = JsonSerializer.SerializeToDocument(this, AuditJobJson.Context.AuditJob);
        var entries = new List<KeyValuePair<string, string>>();
        Flatten(doc.RootElement, string.Empty, entries);
        return entries;
    }

    private static void Flatten(JsonElement e, string prefix, List<KeyValuePair<string, string>> sink)
    {
        if (e.ValueKind == JsonValueKind.Object)
        {
#pragma warning disable IDISP004 // foreach disposes the JsonElement.ObjectEnumerator
            foreach (JsonProperty p in e.EnumerateObject())
#pragma warning restore IDISP004
            {
                Flatten(p.Value, prefix.Length == 0 ? p.Name : prefix + "." + p.Name, sink);
            }
        }
        else
        {
            sink.Add(new(prefix, e.ValueKind == JsonValueKind.String ? e.GetString()! : e.GetRawText()));
        }
    }
}

/// <summary>
/// JSON of an <see cref="AuditJob"/> (snake_case keys, numbers at full precision, NaN and infinities as named
/// literals, an unknown key is an error); source-generated, no reflection.
/// </summary>
public static class AuditJobJson
{
    /// <summary>The generated metadata.</summary>
    internal static AuditJobJsonContext Context { get; } = new(new JsonSerializerOptions
    {
        PropertyNamingPolicy = JsonNamingPolicy.SnakeCaseLower,
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
        UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow,
        IgnoreReadOnlyProperties = true,
        RespectNullableAnnotations = true,
        RespectRequiredConstructorParameters = true,
        Converters = { new FrameSizeConverter(), new CameraConverter() },
    });

    /// <summary>Writes the job as one JSON object.</summary>
    public static void Write(Utf8JsonWriter writer, AuditJob job) => JsonSerializer.Serialize(writer, job, Context.AuditJob);

    /// <summary>Reads a job written by <see cref="Write"/>.</summary>
    /// <exception cref="JsonException">Malformed, a key missing or unknown, or a value of the wrong type.</exception>
    public static AuditJob Read(JsonElement element) =>
        element.Deserialize(Context.AuditJob) ?? throw new JsonException("must be an object");

    /// <summary>A frame size as <c>"WxH"</c> (as <c>--size</c> takes it), or null.</summary>
    private sealed class FrameSizeConverter : JsonConverter<(int Width, int Height)?>
    {
        public override bool HandleNull => true;

        public override (int Width, int Height)? Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
        {
            if (reader.TokenType == JsonTokenType.Null)
            {
                return null;
            }

            string text = reader.GetString() ?? string.Empty;
            string[] parts = text.Split('x');
            if (parts.Length != 2
                || !int.TryParse(parts[0], NumberStyles.None, CultureInfo.InvariantCulture, out int w)
                || !int.TryParse(parts[1], NumberStyles.None, CultureInfo.InvariantCulture, out int h)
                || w < 1 || h < 1)
            {
                throw new JsonException($"frame size '{text}' is not WxH with positive whole numbers");
            }

            return (w, h);
        }

        public override void Write(Utf8JsonWriter writer, (int Width, int Height)? value, JsonSerializerOptions options)
        {
            if (value is (int w, int h))
            {
                writer.WriteStringValue(string.Create(CultureInfo.InvariantCulture, $"{w}x{h}"));
            }
            else
            {
                writer.WriteNullValue();
            }
        }
    }

    /// <summary>A camera as the object of its camera file (<see cref="Geometry.CameraModel.ToJson"/>), validated on reading.</summary>
    private sealed class CameraConverter : JsonConverter<Geometry.CameraModel>
    {
        public override Geometry.CameraModel Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
        {
            using var doc = JsonDocument.ParseValue(ref reader);
            try
            {
                return Geometry.CameraModel.Parse(doc.RootElement.GetRawText(), "camera");
            }
            catch (BadInputException ex)
            {
                throw new JsonException(ex.Message);
            }
        }

        public override void Write(Utf8JsonWriter writer, Geometry.CameraModel value, JsonSerializerOptions options)
        {
            using var doc = JsonDocument.Parse(value.ToJson());
            doc.RootElement.WriteTo(writer);
        }
    }
}

/// <summary>Source-generated JSON metadata of <see cref="AuditJob"/> (options in <see cref="AuditJobJson"/>).</summary>
[JsonSourceGenerationOptions(IncludeFields = false)]
[JsonSerializable(typeof(AuditJob))]
internal sealed partial class AuditJobJsonContext : JsonSerializerContext;
