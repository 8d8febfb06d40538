using System.Buffers;
using System.Globalization;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Metrics;

/// <summary>The run parameters a partial score state carries, which every shard of one job must share.</summary>
public sealed record ScoreStateHeader
{
    /// <summary>Format marker written as the first key.</summary>
    public const string FormatName = "lanebaseline-score-state";

    /// <summary>The shard that wrote the state.</summary>
    [NotInJobKey("the index differs between shards; JobKey adds the count")]
    public required ShardSpec Shard { get; init; }

    /// <summary>Truth path as given to score.</summary>
    public required string Truth { get; init; }

    /// <summary>Records in the truth file.</summary>
    public required int TruthFrames { get; init; }

    /// <summary>Systems scored, in order.</summary>
    public required IReadOnlyList<ScoredSystem> Systems { get; init; }

    /// <summary>Scoring settings.</summary>
    public required ScoreSettings Settings { get; init; }

    /// <summary>Bootstrap resamples the merged result uses.</summary>
    public required int Resamples { get; init; }

    /// <summary>Bootstrap seed the merged result uses.</summary>
    public required ulong Seed { get; init; }

    /// <summary>Whether the state also carries mask IoU (truth and every prediction are mask folders).</summary>
    public bool MaskIou { get; init; }

    /// <summary>
    /// Content hashes (<see cref="IO.ContentHash"/>) of the truth and each system's predictions, in that order; empty in
    /// states written before they were recorded. <c>merge</c> refuses states whose inputs had different contents.
    /// </summary>
    [NotInJobKey("compared on its own, naming the input whose contents differ")]
    public IReadOnlyList<string> InputHashes { get; init; } = [];

    /// <summary>The bootstrap unit asked for (<c>--bootstrap-unit</c>), or null for the default.</summary>
    public BootstrapUnit? Unit { get; init; }

    /// <summary>Coverage of each system's prediction file (whole files, so equal in every shard), or null (older states).</summary>
    [NotInJobKey("derived from the inputs, which the input hashes already compare")]
    public IReadOnlyList<FrameCoverage>? Coverage { get; init; }

    /// <summary>
    /// Everything but the shard index, the input hashes and the coverage (equal for every shard of one job): the shard
    /// count and every other property of the header and of its <see cref="ScoreSettings"/>, walked by
    /// <see cref="ShardJobKey"/>, so a new setting cannot be left out.
    /// </summary>
    public string JobKey() => "shard_count=" + Shard.Count.ToString(CultureInfo.InvariantCulture) + "\n" + ShardJobKey.Of(this);
}

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
            json.WriteString("format", ScoreStateHeader.FormatName);
            json.WriteNumber("version", 1);
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
                Ints(json, "tp", f.TruePositives);
                json.WriteStartArray("iou");
                foreach (double v in f.AssignedIous)
                {
                    json.WriteRawValue(v.ToString("R", CultureInfo.InvariantCulture));
                }

                json.WriteEndArray();
                json.WritePropertyName("acc");
                json.WriteRawValue(f.PointAccuracySum.ToString("R", CultureInfo.InvariantCulture));
                json.WriteNumber("m", f.PointMatched);
                Ints(json, "ctp", f.ConfidenceTruePositives);
                Ints(json, "cp", f.ConfidencePredLanes);
                json.WriteBoolean("conf", f.HasConfidence);
                if (f.LaneScores.Length > 0)
                {
                    json.WriteStartArray("ps"); // scored lanes: score and outcome (calibration metric)
                    foreach (double v in f.LaneScores)
                    {
                        json.WriteRawValue(v.ToString("R", CultureInfo.InvariantCulture));
                    }

                    json.WriteEndArray();
                    json.WriteStartArray("ph");
                    foreach (bool v in f.LaneHits)
                    {
                        json.WriteNumberValue(v ? 1 : 0);
                    }

                    json.WriteEndArray();
                }
                if (f.Ground is { } g)
                {
                    json.WriteStartObject("g");
                    json.WriteStartArray("ls");
                    foreach (double v in g.LateralAbsSumM)
                    {
                        json.WriteRawValue(v.ToString("R", CultureInfo.InvariantCulture));
                    }

                    json.WriteEndArray();
                    Ints(json, "lc", g.LateralCount);
                    json.WritePropertyName("w");
                    if (double.IsFinite(g.EgoWidthAbsErrorM))
                    {
                        json.WriteRawValue(g.EgoWidthAbsErrorM.ToString("R", CultureInfo.InvariantCulture));
                    }
                    else
                    {
                        json.WriteNullValue(); // not measured in this frame
                    }

                    json.WritePropertyName("cs");
                    json.WriteRawValue(g.CurvatureAbsSum.ToString("R", CultureInfo.InvariantCulture));
                    json.WriteNumber("cc", g.CurvatureCount);
                    json.WriteEndObject();
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

    private static void Ints(Utf8JsonWriter json, string name, int[] values)
    {
        json.WriteStartArray(name);
        foreach (int v in values)
        {
            json.WriteNumberValue(v);
        }

        json.WriteEndArray();
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

/// <summary>One truth lane's mask IoU in a partial state: its id, the assigned prediction id (null when none) and IoU.</summary>
public readonly record struct MaskLaneState(int TruthId, int? PredId, double Iou);

/// <summary>One frame's mask IoU for one system in a partial state.</summary>
/// <param name="System">Index of the system in the header.</param>
/// <param name="Frame">The mask's relative path.</param>
/// <param name="PredLanes">Prediction lane ids in the frame.</param>
/// <param name="Lanes">Every truth lane of the frame, in id order.</param>
public sealed record MaskFrameState(int System, string Frame, int PredLanes, IReadOnlyList<MaskLaneState> Lanes);

#pragma warning disable IDISP004 // JsonElement array enumerators own no resources

/// <summary>Reads a partial score state written by <see cref="ScoreStateWriter"/>, frame by frame.</summary>
public sealed class ScoreStateReader : IDisposable
{
    private readonly StreamReader reader;
    private readonly string path;
    private readonly int thresholdCount;
    private long line;
    private string? maskLine; // the first mask IoU line, read while looking for a frame line

    private ScoreStateReader(string path, StreamReader reader, ScoreStateHeader header)
    {
        this.path = path;
        this.reader = reader;
        Header = header;
        thresholdCount = header.Settings.Thresholds.Count;
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
            foreach (JsonElement s in r.GetProperty("s").EnumerateArray())
            {
                int[] tp = Ints(s.GetProperty("tp"));
                if (tp.Length != thresholdCount)
                {
                    throw BadInputException.At(path, line, "s.tp", "threshold count does not match the header");
                }

                int[] ctp = Ints(s.GetProperty("ctp")), cp = Ints(s.GetProperty("cp"));
                if (ctp.Length != FrameScorer.ConfidenceCutoffs || cp.Length != FrameScorer.ConfidenceCutoffs)
                {
                    throw BadInputException.At(path, line, "s.ctp", "confidence cut-off count does not match this build");
                }

                int nt = s.GetProperty("nt").GetInt32(), np = s.GetProperty("np").GetInt32();
                if (nt < 0 || np < 0 || tp.Any(v => v < 0 || v > Math.Min(nt, np)))
                {
                    throw BadInputException.At(path, line, "s.tp", "counts are negative or exceed the lane counts");
                }

                double[] ious = [.. s.GetProperty("iou").EnumerateArray().Select(v => v.GetDouble())];
                double acc = s.GetProperty("acc").GetDouble();
                int matched = s.GetProperty("m").GetInt32();
                CheckConsistent(frame, nt, np, ious, acc, matched, ctp, cp);
                double[] laneScores = s.TryGetProperty("ps", out JsonElement ps) ? [.. ps.EnumerateArray().Select(v => v.GetDouble())] : [];
                bool[] laneHits = s.TryGetProperty("ph", out JsonElement ph) ? [.. ph.EnumerateArray().Select(v => v.GetInt32() != 0)] : [];
                if (laneScores.Length != laneHits.Length || laneScores.Length > np)
                {
                    throw BadInputException.At(path, line, "s.ps", "scored lanes and their outcomes differ in count or exceed the predicted lanes");
                }

                row.Add(new FrameScore
                {
                    Ordinal = ordinal,
                    Frame = frame,
                    Tags = tags,
                    Width = w,
                    Height = h,
                    TruthLanes = nt,
                    PredLanes = np,
                    TruePositives = tp,
                    AssignedIous = ious,
                    PointAccuracySum = acc,
                    PointMatched = matched,
                    ConfidenceTruePositives = ctp,
                    ConfidencePredLanes = cp,
                    HasConfidence = s.GetProperty("conf").GetBoolean(),
                    LaneScores = laneScores,
                    LaneHits = laneHits,
                    Ground = ReadGround(s),
                });
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

    private static int[] Ints(JsonElement e) => [.. e.EnumerateArray().Select(v => v.GetInt32())];

    /// <summary>
    /// The per-frame counts must be ones a scorer can produce (a hand-edited state could otherwise give an accuracy of
    /// 1e9): at most min(truth, predicted) assigned pairs, IoUs in [0, 1], a point-accuracy sum in [0, pairs], and
    /// per-cut-off counts within the lane counts.
    /// </summary>
    private void CheckConsistent(string frame, int nt, int np, double[] ious, double acc, int matched, int[] ctp, int[] cp)
    {
        int pairs = Math.Min(nt, np);
        if (ious.Length > pairs || ious.Any(v => !(v >= 0 && v <= 1)))
        {
            throw BadInputException.At(path, line, "s.iou", $"frame '{frame}': {ious.Length.ToString(CultureInfo.InvariantCulture)} assigned IoUs for {nt.ToString(CultureInfo.InvariantCulture)} truth and {np.ToString(CultureInfo.InvariantCulture)} predicted lanes, or an IoU outside [0, 1]");
        }

        if (matched < 0 || matched > pairs || !(acc >= 0 && acc <= pairs + 1e-9))
        {
            throw BadInputException.At(path, line, "s.acc", string.Create(CultureInfo.InvariantCulture, $"frame '{frame}': point accuracy sum {acc} with {matched} matched lanes is impossible (each assigned pair's accuracy is in [0, 1] and there are at most {pairs} pairs)"));
        }

        for (int k = 0; k < cp.Length; k++)
        {
            if (cp[k] < 0 || cp[k] > np || ctp[k] < 0 || ctp[k] > Math.Min(cp[k], nt))
            {
                throw BadInputException.At(path, line, "s.ctp", $"frame '{frame}': confidence cut-off counts exceed the lane counts");
            }
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

    // Metric-space errors of one frame: present exactly when the header has a camera.
    private FrameGroundErrors? ReadGround(JsonElement s)
    {
        bool has = s.TryGetProperty("g", out JsonElement g);
        if (has != (Header.Settings.Camera is not null))
        {
            throw BadInputException.At(path, line, "s.g", has ? "metric-space errors without a camera in the header" : "metric-space errors missing (the header has a camera)");
        }

        if (!has)
        {
            return null;
        }

        double[] sums = [.. g.GetProperty("ls").EnumerateArray().Select(v => v.GetDouble())];
        int[] counts = Ints(g.GetProperty("lc"));
        if (sums.Length != GroundErrors.DefaultLookAheadM.Count || counts.Length != sums.Length || counts.Any(c => c < 0))
        {
            throw BadInputException.At(path, line, "s.g", "look-ahead distances do not match this build");
        }

        JsonElement w = g.GetProperty("w");
        int curvatureCount = g.GetProperty("cc").GetInt32();
        return new FrameGroundErrors(sums, counts, w.ValueKind == JsonValueKind.Null ? double.NaN : w.GetDouble(), g.GetProperty("cs").GetDouble(), curvatureCount < 0 ? throw new FormatException("negative count") : curvatureCount);
    }

    private static ScoreStateHeader ParseHeader(string path, string text)
    {
        try
        {
            using JsonDocument doc = JsonDocument.Parse(text);
            JsonElement r = doc.RootElement;
            if (r.GetProperty("format").GetString() != ScoreStateHeader.FormatName || r.GetProperty("version").GetInt32() != 1)
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

/// <summary>Merges partial score states of shards 0..N−1 back into the results of one unsharded run.</summary>
public static class ScoreStateMerge
{
    /// <summary>Refuses states whose inputs (same paths) had different contents, naming the input and both states.</summary>
    private static void CheckSameContents(IReadOnlyList<string> paths, IReadOnlyList<ScoreStateHeader> headers)
    {
        ScoreStateHeader h0 = headers[0];
        string[] names = [h0.Truth, .. h0.Systems.Select(s => s.Path)];
        for (int i = 1; i < headers.Count; i++)
        {
            IReadOnlyList<string> a = h0.InputHashes, b = headers[i].InputHashes;
            if (a.Count != b.Count)
            {
                throw BadInputException.At(paths[i], 1, "input_sha256", $"records {b.Count.ToString(CultureInfo.InvariantCulture)} input hashes where {paths[0]} records {a.Count.ToString(CultureInfo.InvariantCulture)} (states of different jobs or versions)");
            }

            for (int k = 0; k < a.Count; k++)
            {
                if (!string.Equals(a[k], b[k], StringComparison.Ordinal))
                {
                    string input = k < names.Length ? names[k] : "input " + k.ToString(CultureInfo.InvariantCulture);
                    throw BadInputException.At(paths[i], 1, "input_sha256", $"was made from different contents of {input} than {paths[0]} ({b[k]} vs {a[k]}); re-run every shard on the same inputs");
                }
            }
        }
    }

    /// <summary>
    /// Checks that the states belong to one job and cover every shard once, then replays their frames in truth
    /// order (a k-way merge on the frame ordinal; each state is already in that order).
    /// </summary>
    /// <param name="paths">State files.</param>
    /// <param name="onHeader">Called once the headers are checked, before any frame.</param>
    /// <param name="onFrame">Called for each frame in truth order (e.g. to write the CSV).</param>
    /// <param name="onMask">Called for each frame's mask IoU (states with mask IoU), system by system, frames in ordinal path order.</param>
    public static (ScoreStateHeader Header, SystemScore[] Results) Merge(
        IReadOnlyList<string> paths, Action<ScoreStateHeader>? onHeader = null, Action<IReadOnlyList<FrameScore>>? onFrame = null, Action<MaskFrameState>? onMask = null)
    {
        ArgumentNullException.ThrowIfNull(paths);
        if (paths.Count == 0)
        {
            throw new BadInputException("merge: no state files given");
        }

        var readers = new List<ScoreStateReader>();
        try
        {
            foreach (string p in paths)
            {
                readers.Add(ScoreStateReader.Open(p));
            }

            ScoreStateHeader h0 = readers[0].Header;
            CheckSameContents(paths, [.. readers.Select(r => r.Header)]);
            ShardCoverage.Check(paths, [.. readers.Select(r => (r.Header.Shard, r.Header.JobKey()))], string.Empty, "truth, systems, settings or shard count");

            onHeader?.Invoke(h0);
            SystemScore[] results = ScoreRun.CreateResults(h0.Systems, h0.Settings);
            if (h0.Coverage is { } coverage && coverage.Count == results.Length)
            {
                for (int s = 0; s < results.Length; s++)
                {
                    results[s].Coverage = coverage[s];
                }
            }

            int halfIndex = h0.Settings.HalfIndex;
            var heads = new FrameScore[]?[readers.Count];
            for (int i = 0; i < readers.Count; i++)
            {
                heads[i] = readers[i].Next();
            }

            int expected = 0;
            while (true)
            {
                int best = -1;
                for (int i = 0; i < heads.Length; i++)
                {
                    if (heads[i] is { } hd && (best < 0 || hd[0].Ordinal < heads[best]![0].Ordinal))
                    {
                        best = i;
                    }
                }

                if (best < 0)
                {
                    break;
                }

                FrameScore[] row = heads[best]!;
                if (row[0].Ordinal != expected)
                {
                    throw BadInputException.At(paths[best], 0, null, string.Create(
                        CultureInfo.InvariantCulture,
                        $"frame '{row[0].Frame}' has ordinal {row[0].Ordinal} where {expected} was expected (a state is incomplete, duplicated or out of order)"));
                }

                ScoreRun.Accumulate(results, row, halfIndex);
                onFrame?.Invoke(row);
                expected++;
                heads[best] = readers[best].Next();
            }

            if (expected != h0.TruthFrames)
            {
                throw new BadInputException(string.Create(CultureInfo.InvariantCulture, $"merge: the states hold {expected} frames but the truth has {h0.TruthFrames} (a shard run was interrupted?) ({BadInputException.Files(paths)})"));
            }

            if (h0.MaskIou)
            {
                // Replayed in the unsharded run's order (system, then mask path, ordinal), so the sums are the same bytes.
                var masks = new List<MaskFrameState>();
                foreach (ScoreStateReader r in readers)
                {
                    masks.AddRange(r.ReadMasks());
                }

                masks.Sort((a, b) => a.System != b.System ? a.System.CompareTo(b.System) : string.CompareOrdinal(a.Frame, b.Frame));
                for (int i = 1; i < masks.Count; i++)
                {
                    if (masks[i].System == masks[i - 1].System && masks[i].Frame == masks[i - 1].Frame)
                    {
                        throw new BadInputException($"merge: the mask IoU of '{masks[i].Frame}' appears in more than one state ({BadInputException.Files(paths)})");
                    }
                }

                foreach (MaskFrameState m in masks)
                {
                    onMask?.Invoke(m);
                }
            }

            return (h0, results);
        }
        finally
        {
            foreach (ScoreStateReader r in readers)
            {
                r.Dispose();
            }
        }
    }
}
