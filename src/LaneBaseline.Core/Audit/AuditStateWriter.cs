using System.Buffers;
using System.Globalization;
using System.Text.Encodings.Web;
using System.Text.Json;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// Partial audit state (<c>audit --shard K/N --partial FILE</c>): JSON Lines — a header, then one <c>frame</c> line
/// for every frame with findings or a baseline comparison (its key, position in the prediction file and
/// disagreement), then one <c>finding</c> line per finding with every field at full precision. That is all
/// <see cref="AuditResult"/> ranking needs, so <see cref="AuditStateMerge"/> rebuilds exactly what one unsharded run
/// writes.
/// </summary>
public static class AuditStateWriter
{
    private static readonly JsonWriterOptions Options = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    /// <summary>Writes the state of one shard's result.</summary>
    public static void Write(Stream stream, AuditStateHeader header, AuditResult result)
    {
        ArgumentNullException.ThrowIfNull(stream);
        ArgumentNullException.ThrowIfNull(header);
        ArgumentNullException.ThrowIfNull(result);
        var buffer = new ArrayBufferWriter<byte>(1024);
        void Line(Action<Utf8JsonWriter> body)
        {
            buffer.ResetWrittenCount();
            using (var json = new Utf8JsonWriter(buffer, Options))
            {
                json.WriteStartObject();
                body(json);
                json.WriteEndObject();
            }

            buffer.Write("\n"u8);
            stream.Write(buffer.WrittenSpan);
        }

        Line(json =>
        {
            json.WriteString("tool", "lanebaseline");
            json.WriteString("format", AuditStateHeader.FormatName);
            json.WriteNumber("schema_version", AuditStateHeader.Version);
            json.WriteNumber("shard_index", header.Shard.Index);
            json.WriteNumber("shard_count", header.Shard.Count);
            json.WriteNumber("input_frames", header.InputFrames);
            json.WriteNumber("frames", header.Frames);
            json.WriteNumber("compared_frames", header.ComparedFrames);
            json.WritePropertyName("job");
            AuditJobJson.Write(json, header.Job);
        });
        foreach (AuditFrameScore f in result.RankedFrames.OrderBy(f => f.Ordinal))
        {
            Line(json =>
            {
                json.WriteString("t", "frame");
                json.WriteString("frame", f.Frame);
                json.WriteNumber("ordinal", f.Ordinal);
                WriteDouble(json, "disagreement", f.Disagreement);
            });
        }

        foreach (AuditFinding f in result.Findings.OrderBy(f => f.Ordinal))
        {
            Line(json =>
            {
                json.WriteString("t", "finding");
                json.WriteString("frame", f.Frame);
                json.WriteNumber("ordinal", f.Ordinal);
                json.WriteString("rule", f.Rule);
                json.WriteString("severity", AuditJsonWriter.SeverityName(f.Severity));
                WriteInt(json, "lane", f.Lane);
                WriteInt(json, "other_lane", f.OtherLane);
                WriteDouble(json, "value", f.Value);
                WriteDouble(json, "limit", f.Limit);
                json.WriteString("unit", f.Unit);
                json.WriteString("message", f.Message);
            });
        }
    }

    private static void WriteInt(Utf8JsonWriter json, string name, int? value)
    {
        if (value is int v)
        {
            json.WriteNumber(name, v);
        }
        else
        {
            json.WriteNull(name);
        }
    }

    // Shortest round-trip text of finite values; non-finite ones as strings ("NaN", "Infinity", "-Infinity").
    private static void WriteDouble(Utf8JsonWriter json, string name, double? value)
    {
        if (value is not double v)
        {
            json.WriteNull(name);
        }
        else if (double.IsFinite(v))
        {
            json.WriteNumber(name, v);
        }
        else
        {
            json.WriteString(name, v.ToString("R", CultureInfo.InvariantCulture));
        }
    }
}
