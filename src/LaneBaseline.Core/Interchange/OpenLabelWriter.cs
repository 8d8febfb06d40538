using System.Globalization;
using System.Text.Encodings.Web;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Interchange;

/// <summary>
/// Streams lane records into one ASAM OpenLABEL 1.0.0 JSON document: frame <c>n</c> is the n-th record (zero-based);
/// each lane is an object of type <see cref="OpenLabel.LaneMarkingType"/> with one <c>poly2d</c> item
/// (<c>MODE_POLY2D_ABSOLUTE</c>, <c>closed: false</c>, points near to far as in the lane file); slot and score are
/// <c>num</c> attributes, kind a <c>text</c> attribute; the frame key, size, tags and unknown keys go under
/// <c>frame_properties.lanebaseline</c>. The object table is written after the frames, so only one integer per frame is
/// held in memory.
/// </summary>
public sealed class OpenLabelWriter : IDisposable
{
    private static readonly JsonWriterOptions Options = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping, Indented = false };
    private readonly Stream stream;
    private readonly Utf8JsonWriter json;
    private readonly List<int> lanesPerFrame = [];
    private bool completed;
    private int nextUid;

    /// <summary>Creates a writer on a stream it then owns, and writes the document head.</summary>
    public OpenLabelWriter(Stream stream)
    {
        this.stream = stream;
        json = new Utf8JsonWriter(stream, Options);
        json.WriteStartObject();
        json.WriteStartObject("openlabel");
        json.WriteStartObject("metadata");
        json.WriteString("schema_version", OpenLabel.SchemaVersion);
        json.WriteString("annotator", "lanebaseline");
        json.WriteString("comment", "Lane markings as image polylines in pixels (x right, y down, top-left pixel centre at (0,0)), near to far; object type '" + OpenLabel.LaneMarkingType + "'.");
        json.WriteEndObject();
        json.WriteStartObject("frames");
    }

    /// <summary>Creates (or truncates) an OpenLABEL file.</summary>
    public static OpenLabelWriter Create(string path) =>
        new(new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 16));

    /// <summary>Writes one record as the next frame.</summary>
    public void Write(LaneRecord record)
    {
        ArgumentNullException.ThrowIfNull(record);
        ObjectDisposedException.ThrowIf(completed, this);
        int frameNumber = lanesPerFrame.Count;
        int firstUid = nextUid;
        json.WriteStartObject(frameNumber.ToString(CultureInfo.InvariantCulture));
        json.WriteStartObject("frame_properties");
        json.WriteStartObject(OpenLabel.FramePropertiesKey);
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
            foreach (string t in record.Tags)
            {
                json.WriteStringValue(t);
            }

            json.WriteEndArray();
        }

        WriteExtra("extra", record.ExtraJson);
        json.WriteEndObject();
        json.WriteEndObject();
        json.WriteStartObject("objects");
        for (int i = 0; i < record.Lanes.Count; i++)
        {
            Lane lane = record.Lanes[i];
            json.WriteStartObject((firstUid + i).ToString(CultureInfo.InvariantCulture));
            json.WriteStartObject("object_data");
            json.WriteStartArray("poly2d");
            json.WriteStartObject();
            json.WriteString("name", OpenLabel.PolylineName);
            json.WriteStartArray("val");
            foreach (LanePoint p in lane.Points)
            {
                json.WriteNumberValue(p.X);
                json.WriteNumberValue(p.Y);
            }

            json.WriteEndArray();
            json.WriteString("mode", OpenLabel.AbsoluteMode);
            json.WriteBoolean("closed", false);
            if (lane.Slot is not null || lane.Score is not null || lane.Kind is not null)
            {
                json.WriteStartObject("attributes");
                if (lane.Slot is not null || lane.Score is not null)
                {
                    json.WriteStartArray("num");
                    if (lane.Slot is int slot)
                    {
                        WriteAttribute("slot", slot);
                    }

                    if (lane.Score is double score)
                    {
                        WriteAttribute("score", score);
                    }

                    json.WriteEndArray();
                }

                if (lane.Kind is string kind)
                {
                    json.WriteStartArray("text");
                    json.WriteStartObject();
                    json.WriteString("name", "kind");
                    json.WriteString("val", kind);
                    json.WriteEndObject();
                    json.WriteEndArray();
                }

                json.WriteEndObject();
            }

            WriteExtra(OpenLabel.LaneExtraKey, lane.ExtraJson);
            json.WriteEndObject();
            json.WriteEndArray();
            json.WriteEndObject();
            json.WriteEndObject();
        }

        json.WriteEndObject();
        json.WriteEndObject();
        lanesPerFrame.Add(record.Lanes.Count);
        nextUid += record.Lanes.Count;
        json.Flush();
    }

    /// <summary>Writes the object table and closes the document.</summary>
    public void Complete()
    {
        if (completed)
        {
            return;
        }

        json.WriteEndObject(); // frames
        json.WriteStartObject("objects");
        int uid = 0;
        for (int f = 0; f < lanesPerFrame.Count; f++)
        {
            for (int i = 0; i < lanesPerFrame[f]; i++)
            {
                json.WriteStartObject(uid.ToString(CultureInfo.InvariantCulture));
                json.WriteString("name", string.Create(CultureInfo.InvariantCulture, $"frame {f} lane {i}"));
                json.WriteString("type", OpenLabel.LaneMarkingType);
                json.WriteStartArray("frame_intervals");
                json.WriteStartObject();
                json.WriteNumber("frame_start", f);
                json.WriteNumber("frame_end", f);
                json.WriteEndObject();
                json.WriteEndArray();
                json.WriteEndObject();
                uid++;
            }
        }

        json.WriteEndObject();
        if (lanesPerFrame.Count > 0)
        {
            json.WriteStartArray("frame_intervals");
            json.WriteStartObject();
            json.WriteNumber("frame_start", 0);
            json.WriteNumber("frame_end", lanesPerFrame.Count - 1);
            json.WriteEndObject();
            json.WriteEndArray();
        }

        json.WriteEndObject(); // openlabel
        json.WriteEndObject();
        json.Flush();
        stream.Write("\n"u8);
        stream.Flush();
        completed = true;
    }

    private void WriteAttribute(string name, double value)
    {
        json.WriteStartObject();
        json.WriteString("name", name);
        json.WriteNumber("val", value);
        json.WriteEndObject();
    }

    private void WriteExtra(string key, IReadOnlyList<KeyValuePair<string, string>> extra)
    {
        if (extra.Count == 0)
        {
            return;
        }

        json.WriteStartObject(key);
        foreach (KeyValuePair<string, string> kv in extra)
        {
            json.WritePropertyName(kv.Key);
            json.WriteRawValue(kv.Value, skipInputValidation: true);
        }

        json.WriteEndObject();
    }

    /// <inheritdoc />
    public void Dispose()
    {
        json.Dispose();
#pragma warning disable IDISP007 // the writer owns the stream it was given (documented contract)
        stream.Dispose();
#pragma warning restore IDISP007
    }
}
