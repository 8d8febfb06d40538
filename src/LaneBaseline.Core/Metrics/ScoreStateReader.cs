using System.Globalization;
using System.Text;
using System.Text.Json;
using LaneBaseline.Core.Metrics.Coverage;
using LaneBaseline.Core.Metrics.Ground;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Metrics;

#pragma warning disable IDISP004 // JsonElement array enumerators own no resources

/// <summary>Reads a partial score state written by <see cref="ScoreStateWriter"/>, frame by frame.</summary>
public sealed class ScoreStateReader : IDisposable
{
    private readonly StreamReader reader;
    private readonly string path;
    private long line;
    private string? maskLine; // the first mask IoU line, read while looking for a frame line

    private ScoreStateReader(string path, StreamReader reader, ScoreStateHeader header)
    {
        this.path = path;
        this.reader = reader;
        Header = header;
        line = 1;
    }

    /// <summary>The header.</summary>
    public ScoreStateHeader Header { get; }

    /// <summary>Opens a state file and reads its header.</summary>
    public static ScoreStateReader Open(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, Directory.Exists(path) ? "is a directory, expected a score state file" : "file not found");
        }

        var reader = new StreamReader(IO.InputSpool.ReadablePath(path), new UTF8Encoding(false, true));
        try
        {
            string? first = reader.ReadLine();
            if (first is null)
            {
                throw BadInputException.At(path, 1, null, "empty file, expected a score state written by score --partial");
            }

            return new ScoreStateReader(path, reader, ParseHeader(path, first));
        }
        catch (DecoderFallbackException)
        {
            reader.Dispose();
            throw BadInputException.At(path, 1, null, "not valid UTF-8 text");
        }
        catch
        {
            reader.Dispose();
            throw;
        }
    }

    /// <summary>Reads the next frame's scores (one per system), or null at the end.</summary>
    public FrameScore[]? Next()
    {
        if (maskLine is not null)
        {
            return null; // the frame lines ended where the mask lines began
        }

        string? text = ReadLine();
        if (text is null)
        {
            return null;
        }

        try
        {
            using JsonDocument doc = JsonDocument.Parse(text);
            JsonElement r = doc.RootElement;
            if (r.ValueKind == JsonValueKind.Object && r.TryGetProperty("t", out JsonElement kind) && kind.ValueKind == JsonValueKind.String && kind.GetString() == "mask")
            {
                maskLine = text;
                return null;
            }

            int ordinal = r.GetProperty("o").GetInt32();
            string frame = r.GetProperty("frame").GetString()!;
            string[] tags = [.. r.GetProperty("tags").EnumerateArray().Select(t => t.GetString()!)];
            int w = r.GetProperty("w").GetInt32(), h = r.GetProperty("h").GetInt32();
            if (w <= 0 || h <= 0)
            {
                throw BadInputException.At(path, line, "w", string.Create(CultureInfo.InvariantCulture, $"frame '{frame}' has size {w}x{h}; sizes are positive"));
            }

            if (ordinal < 0 || ordinal >= Header.TruthFrames)
            {
                throw BadInputException.At(path, line, "o", string.Create(CultureInfo.InvariantCulture, $"ordinal {ordinal} of frame '{frame}' is outside the truth's {Header.TruthFrames} frames"));
            }

            if (!Header.Shard.ContainsFrame(frame))
            {
                throw BadInputException.At(path, line, "frame", $"frame '{frame}' does not belong to shard {Header.Shard} (a foreign frame key)");
            }

            var row = new List<FrameScore>();
            FrameStateSource? source = null;
            foreach (JsonElement s in r.GetProperty("s").EnumerateArray())
            {
                int nt = s.GetProperty("nt").GetInt32(), np = s.GetProperty("np").GetInt32();
                var frameScore = new FrameScore
                {
                    Ordinal = ordinal,
                    Frame = frame,
                    Tags = tags,
                    Width = w,
                    Height = h,
                    TruthLanes = nt,
                    PredLanes = np,
                };
                source ??= new FrameStateSource(path, line, Header);
                foreach (IMetricUnit unit in MetricCatalogue.Units)
                {
                    unit.ReadFrameState(s, source, frameScore);
                }

                row.Add(frameScore);
            }

            if (row.Count != Header.Systems.Count)
            {
                throw BadInputException.At(path, line, "s", "system count does not match the header");
            }

            return [.. row];
        }
        catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or FormatException or ArgumentException or OverflowException)
        {
            throw BadInputException.At(path, line, null, "not a score state record: " + ex.Message);
        }
    }

    private string? ReadLine()
    {
        try
        {
            string? text = reader.ReadLine();
            if (text is not null)
            {
                line++;
            }

            return text;
        }
        catch (DecoderFallbackException)
        {
            throw BadInputException.At(path, line + 1, null, "not valid UTF-8 text");
        }
    }

    /// <summary>The mask IoU lines that follow the frame lines (call after <see cref="Next"/> returned null).</summary>
    public IEnumerable<MaskFrameState> ReadMasks()
    {
        string? text = maskLine ?? ReadLine();
        maskLine = null;
        while (text is not null)
        {
            if (!Header.MaskIou)
            {
                throw BadInputException.At(path, line, "t", "mask IoU line in a state whose header has no mask_iou");
            }

            MaskFrameState m;
            try
            {
                using JsonDocument doc = JsonDocument.Parse(text);
                JsonElement r = doc.RootElement;
                if (r.GetProperty("t").GetString() != "mask")
                {
                    throw BadInputException.At(path, line, "t", "frame line after the mask IoU lines");
                }

                int system = r.GetProperty("s").GetInt32();
                int predLanes = r.GetProperty("np").GetInt32();
                if (system < 0 || system >= Header.Systems.Count || predLanes < 0)
                {
                    throw BadInputException.At(path, line, "s", "system index or lane count out of range");
                }

                var lanes = new List<MaskLaneState>();
                foreach (JsonElement l in r.GetProperty("lanes").EnumerateArray())
                {
                    JsonElement pid = l[1];
                    lanes.Add(new MaskLaneState(l[0].GetInt32(), pid.ValueKind == JsonValueKind.Null ? null : pid.GetInt32(), l[2].GetDouble()));
                }

                m = new MaskFrameState(system, r.GetProperty("frame").GetString()!, predLanes, lanes);
            }
            catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or FormatException or ArgumentException or OverflowException or IndexOutOfRangeException)
            {
                throw BadInputException.At(path, line, null, "not a mask IoU record: " + ex.Message);
            }

            yield return m;
            text = ReadLine();
        }
    }

    private static ScoreStateHeader ParseHeader(string path, string text)
    {
        try
        {
            using JsonDocument doc = JsonDocument.Parse(text);
            JsonElement r = doc.RootElement;
            // schema_version since 2026-12-05; "version" before (still read).
            bool versioned = r.TryGetProperty("schema_version", out JsonElement version) || r.TryGetProperty("version", out version);
            if (r.GetProperty("format").GetString() != ScoreStateHeader.FormatName || !versioned || version.GetInt32() != ScoreStateHeader.SchemaVersion)
            {
                throw BadInputException.At(path, 1, "format", "not a version-1 score state written by score --partial");
            }

            return new ScoreStateHeader
            {
                Shard = new ShardSpec(r.GetProperty("shard_index").GetInt32(), r.GetProperty("shard_count").GetInt32()),
                Truth = r.GetProperty("truth").GetString()!,
                TruthFrames = r.GetProperty("truth_frames").GetInt32(),
                Systems = [.. r.GetProperty("systems").EnumerateArray().Select(s => new ScoredSystem(s.GetProperty("name").GetString()!, s.GetProperty("path").GetString()!))],
                Settings = new ScoreSettings
                {
                    LaneWidthPx = r.TryGetProperty("lane_width_px", out JsonElement lw) ? lw.GetInt32() : null,
                    TolerancePx = r.TryGetProperty("tolerance_px", out JsonElement tol) ? tol.GetDouble() : null,
                    ExtraThresholds = [.. r.GetProperty("extra_iou").EnumerateArray().Select(t => IouThreshold.Parse(t.GetString()!))],
                    Camera = r.TryGetProperty("camera", out JsonElement cam) ? Geometry.CameraModel.Parse(cam.GetString()!, path + " (camera)") : null,
                },
                MaskIou = r.TryGetProperty("mask_iou", out JsonElement mi) && mi.GetBoolean(),
                InputHashes = r.TryGetProperty("input_sha256", out JsonElement ih) ? [.. ih.EnumerateArray().Select(v => v.GetString()!)] : [],
                Resamples = r.GetProperty("bootstrap").GetInt32(),
                Seed = r.GetProperty("seed").GetUInt64(),
                Unit = r.TryGetProperty("bootstrap_unit", out JsonElement bu)
                    ? bu.GetString() switch
                    {
                        "sequence" => BootstrapUnit.Sequence,
                        "frame" => BootstrapUnit.Frame,
                        _ => throw new FormatException("bootstrap_unit must be 'sequence' or 'frame'"),
                    }
                    : null,
                Coverage = r.TryGetProperty("coverage", out JsonElement cov)
                    ? [.. cov.EnumerateArray().Select(FrameCoverage.ReadJson)]
                    : null,
            };
        }
        catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or FormatException or ArgumentException or OverflowException)
        {
            throw BadInputException.At(path, 1, null, "not a score state header: " + ex.Message);
        }
    }

    /// <inheritdoc />
    public void Dispose() => reader.Dispose();
}

#pragma warning restore IDISP004
