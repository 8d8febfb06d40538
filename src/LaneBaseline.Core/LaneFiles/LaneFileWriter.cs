using System.Buffers;
using System.Text.Encodings.Web;
using System.Text.Json;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// Writes lane-file records one per line, flushing after each so an interrupted run leaves a valid prefix.
/// Unknown keys read from a file are written back after the known ones.
/// </summary>
public sealed class LaneFileWriter : IDisposable
{
    private static readonly JsonWriterOptions WriterOptions = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping, SkipValidation = false };
    private readonly Stream stream;
    private readonly bool leaveOpen;
    private readonly ArrayBufferWriter<byte> buffer = new(4096);

    /// <summary>Creates a writer on a stream that it then owns.</summary>
    public LaneFileWriter(Stream stream)
        : this(stream, leaveOpen: false)
    {
    }

    /// <summary>Creates a writer on a stream; with <paramref name="leaveOpen"/> the caller keeps owning it (e.g. an <c>AtomicFile</c>'s).</summary>
    public LaneFileWriter(Stream stream, bool leaveOpen)
    {
        this.stream = stream;
        this.leaveOpen = leaveOpen;
    }

    /// <summary>Whether to flush the stream after every record (default true).</summary>
    public bool FlushEachRecord { get; init; } = true;

    /// <summary>Creates (or truncates) a lane file.</summary>
    public static LaneFileWriter Create(string path) =>
        new(new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.Read, 1 << 16));

    /// <summary>Writes one record as one line.</summary>
    public void Write(LaneRecord record)
    {
        buffer.ResetWrittenCount();
        using (var json = new Utf8JsonWriter(buffer, WriterOptions))
        {
            WriteRecord(json, record);
        }

        buffer.Write("\n"u8);
        stream.Write(buffer.WrittenSpan);
        if (FlushEachRecord)
        {
            stream.Flush();
        }
    }

    /// <summary>Serializes a record to one line of JSON text (no newline).</summary>
    public static string ToJsonLine(LaneRecord record)
    {
        var b = new ArrayBufferWriter<byte>(1024);
        using (var json = new Utf8JsonWriter(b, WriterOptions))
        {
            WriteRecord(json, record);
        }

        return System.Text.Encoding.UTF8.GetString(b.WrittenSpan);
    }

    private static void WriteRecord(Utf8JsonWriter json, LaneRecord record)
    {
        json.WriteStartObject();
        json.WriteString("frame", record.Frame);
        if (record.Width is int w)
        {
            json.WriteNumber("width", w);
        }

        if (record.Height is int h)
        {
            json.WriteNumber("height", h);
        }

        if (record.Tags.Count > 0)
        {
            json.WriteStartArray("tags");
            foreach (string tag in record.Tags)
            {
                json.WriteStringValue(tag);
            }

            json.WriteEndArray();
        }

        json.WriteStartArray("lanes");
        foreach (Lane lane in record.Lanes)
        {
            json.WriteStartObject();
            json.WriteStartArray("points");
            foreach (LanePoint p in lane.Points)
            {
                json.WriteStartArray();
                json.WriteNumberValue(p.X);
                json.WriteNumberValue(p.Y);
                json.WriteEndArray();
            }

            json.WriteEndArray();
            if (lane.Slot is int slot)
            {
                json.WriteNumber("slot", slot);
            }

            if (lane.Score is double score)
            {
                json.WriteNumber("score", score);
            }

            if (lane.Kind is string kind)
            {
                json.WriteString("kind", kind);
            }

            WriteExtra(json, lane.ExtraJson);
            json.WriteEndObject();
        }

        json.WriteEndArray();
        WriteExtra(json, record.ExtraJson);
        json.WriteEndObject();
    }

    private static void WriteExtra(Utf8JsonWriter json, IReadOnlyList<KeyValuePair<string, string>> extra)
    {
        foreach (KeyValuePair<string, string> kv in extra)
        {
            json.WritePropertyName(kv.Key);
            json.WriteRawValue(kv.Value, skipInputValidation: true);
        }
    }

    /// <inheritdoc />
    public void Dispose()
    {
        stream.Flush();
        if (!leaveOpen)
        {
#pragma warning disable IDISP007 // the writer owns the stream it was given (documented contract)
            stream.Dispose();
#pragma warning restore IDISP007
        }
    }
}
