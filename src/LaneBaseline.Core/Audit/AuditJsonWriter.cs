using System.Buffers;
using System.Text.Encodings.Web;
using System.Text.Json;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// Writes findings as JSON Lines, one finding per line in rank order: <c>rank</c> (frame rank, 1 = worst),
/// <c>frame</c>, <c>rule</c>, <c>name</c>, <c>severity</c>, <c>lane</c> (null for the whole frame), <c>other_lane</c>
/// (pair rules only), <c>value</c>, <c>limit</c>, <c>unit</c>, <c>message</c>.
/// </summary>
public static class AuditJsonWriter
{
    private static readonly JsonWriterOptions Options = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    /// <summary>Writes every finding of a result.</summary>
    public static void Write(Stream stream, AuditResult result)
    {
        ArgumentNullException.ThrowIfNull(stream);
        ArgumentNullException.ThrowIfNull(result);
        var buffer = new ArrayBufferWriter<byte>(1024);
        for (int i = 0; i < result.Findings.Count; i++)
        {
            AuditFinding f = result.Findings[i];
            buffer.ResetWrittenCount();
            using (var json = new Utf8JsonWriter(buffer, Options))
            {
                json.WriteStartObject();
                json.WriteNumber("rank", result.Ranks[i]);
                json.WriteString("frame", f.Frame);
                json.WriteString("rule", f.Rule);
                json.WriteString("name", AuditRules.Get(f.Rule).Name);
                json.WriteString("severity", SeverityName(f.Severity));
                if (f.Lane is int lane)
                {
                    json.WriteNumber("lane", lane);
                }
                else
                {
                    json.WriteNull("lane");
                }

                if (f.OtherLane is int other)
                {
                    json.WriteNumber("other_lane", other);
                }

                json.WriteNumber("value", Math.Round(f.Value, 6));
                json.WriteNumber("limit", Math.Round(f.Limit, 6));
                json.WriteString("unit", f.Unit);
                json.WriteString("message", f.Message);
                json.WriteEndObject();
            }

            buffer.Write("\n"u8);
            stream.Write(buffer.WrittenSpan);
        }
    }

    /// <summary>The lower-case severity name used in files and options.</summary>
    public static string SeverityName(AuditSeverity s) => s switch
    {
        AuditSeverity.Error => "error",
        AuditSeverity.Warning => "warning",
        _ => "info",
    };
}
