using System.Buffers;
using System.Globalization;
using System.Text.Encodings.Web;
using System.Text.Json;
using LaneBaseline.Core.Metrics.Coverage;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Partial score state (<c>score --partial</c>): the sufficient statistics of one shard as JSON Lines — a header line,
/// then one line per scored frame in truth order holding every per-frame count the aggregates, the per-tag tallies,
/// the bootstrap and the CSV are built from. <c>merge</c> replays the frames of all shards in truth order and so
/// writes exactly what one unsharded run writes.
/// </summary>
public sealed class ScoreStateWriter : IDisposable
{
    private static readonly JsonWriterOptions Options = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };
    private readonly Stream stream;
    private readonly ArrayBufferWriter<byte> buffer = new(4096);

    /// <summary>Creates a writer on a stream it then owns, and writes the header.</summary>
    public ScoreStateWriter(Stream stream, ScoreStateHeader header)
    {
        ArgumentNullException.ThrowIfNull(header);
        this.stream = stream;
        using (var json = new Utf8JsonWriter(buffer, Options))
        {
            json.WriteStartObject();
            json.WriteString("tool", "lanebaseline");
            json.WriteString("format", ScoreStateHeader.FormatName);
            json.WriteNumber("schema_version", ScoreStateHeader.SchemaVersion);
            json.WriteNumber("shard_index", header.Shard.Index);
            json.WriteNumber("shard_count", header.Shard.Count);
            json.WriteString("truth", header.Truth);
            json.WriteNumber("truth_frames", header.TruthFrames);
            json.WriteStartArray("systems");
            foreach (ScoredSystem s in header.Systems)
            {
                json.WriteStartObject();
                json.WriteString("name", s.Name);
                json.WriteString("path", s.Path);
                json.WriteEndObject();
            }

            json.WriteEndArray();
            if (header.Settings.LaneWidthPx is int lw)
            {
                json.WriteNumber("lane_width_px", lw);
            }

            if (header.Settings.TolerancePx is double tol)
            {
                json.WritePropertyName("tolerance_px");
                json.WriteRawValue(tol.ToString("R", CultureInfo.InvariantCulture));
            }

            json.WriteStartArray("extra_iou");
            foreach (IouThreshold t in header.Settings.ExtraThresholds)
            {
                json.WriteStringValue(t.Key);
            }

            json.WriteEndArray();
            json.WriteNumber("bootstrap", header.Resamples);
            json.WriteNumber("seed", header.Seed);
            if (header.Settings.Camera is { } camera)
            {
                json.WriteString("camera", camera.ToJson());
            }

            if (header.MaskIou)
            {
                json.WriteBoolean("mask_iou", true);
            }

            if (header.InputHashes.Count > 0)
            {
                json.WriteStartArray("input_sha256");
                foreach (string h in header.InputHashes)
                {
                    json.WriteStringValue(h);
                }

                json.WriteEndArray();
            }

            if (header.Unit is { } unit)
            {
                json.WriteString("bootstrap_unit", unit == BootstrapUnit.Sequence ? "sequence" : "frame");
            }

            if (header.Coverage is { } coverage)
            {
                json.WriteStartArray("coverage");
                foreach (FrameCoverage c in coverage)
                {
                    c.WriteJson(json);
                }

                json.WriteEndArray();
            }

            json.WriteEndObject();
        }

        Emit();
    }

    /// <summary>Appends one frame (one score per system).</summary>
    public void Write(IReadOnlyList<FrameScore> row)
    {
        ArgumentNullException.ThrowIfNull(row);
        using (var json = new Utf8JsonWriter(buffer, Options))
        {
            FrameScore f0 = row[0];
            json.WriteStartObject();
            json.WriteNumber("o", f0.Ordinal);
            json.WriteString("frame", f0.Frame);
            json.WriteStartArray("tags");
            foreach (string t in f0.Tags)
            {
                json.WriteStringValue(t);
            }

            json.WriteEndArray();
            json.WriteNumber("w", f0.Width);
            json.WriteNumber("h", f0.Height);
            json.WriteStartArray("s");
            foreach (FrameScore f in row)
            {
                json.WriteStartObject();
                json.WriteNumber("nt", f.TruthLanes);
                json.WriteNumber("np", f.PredLanes);
                foreach (IMetricUnit unit in MetricCatalogue.Units)
                {
                    unit.WriteFrameState(json, f);
                }

                json.WriteEndObject();
            }

            json.WriteEndArray();
            json.WriteEndObject();
        }

        Emit();
    }

    /// <summary>Appends one frame's mask IoU for one system (after every frame line).</summary>
    public void WriteMask(MaskFrameState mask)
    {
        ArgumentNullException.ThrowIfNull(mask);
        using (var json = new Utf8JsonWriter(buffer, Options))
        {
            json.WriteStartObject();
            json.WriteString("t", "mask");
            json.WriteNumber("s", mask.System);
            json.WriteString("frame", mask.Frame);
            json.WriteNumber("np", mask.PredLanes);
            json.WriteStartArray("lanes");
            foreach (MaskLaneState lane in mask.Lanes)
            {
                json.WriteStartArray();
                json.WriteNumberValue(lane.TruthId);
                if (lane.PredId is int pid)
                {
                    json.WriteNumberValue(pid);
                }
                else
                {
                    json.WriteNullValue();
                }

                json.WriteRawValue(lane.Iou.ToString("R", CultureInfo.InvariantCulture));
                json.WriteEndArray();
            }

            json.WriteEndArray();
            json.WriteEndObject();
        }

        Emit();
    }

    private void Emit()
    {
        buffer.Write("\n"u8);
        stream.Write(buffer.WrittenSpan);
        buffer.ResetWrittenCount();
    }

    /// <inheritdoc />
    public void Dispose()
    {
        stream.Flush();
#pragma warning disable IDISP007 // the writer owns the stream it was given (documented contract)
        stream.Dispose();
#pragma warning restore IDISP007
    }
}
