using System.Globalization;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace LaneBaseline.Core.Audit;

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
