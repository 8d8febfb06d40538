using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;

#pragma warning disable IDISP004 // JsonElement enumerators own no resources; foreach disposes them anyway

namespace LaneBaseline.Core.Interchange;

/// <summary>
/// Reads an ASAM OpenLABEL 1.0.0 JSON document as lane records, one per frame in ascending frame number. Every
/// <c>poly2d</c> item of an object whose type is <see cref="OpenLabel.LaneMarkingType"/> becomes a lane (objects of
/// other types are skipped and counted in <see cref="SkippedObjects"/>). The frame key, size and tags come from
/// <c>frame_properties.lanebaseline</c> when present; otherwise the key is the six-digit frame number and the size
/// comes from the reference or <c>--size</c>. An OpenLABEL file is one JSON document, so it is parsed whole (lane files
/// and mask folders stream); errors name the file and the JSON path.
/// </summary>
public sealed class OpenLabelSource : ILaneRecordSource
{
    private readonly JsonDocument document;
    private readonly List<(long Number, JsonElement Frame)> frames = [];
    private readonly Dictionary<string, string> typeByUid = new(StringComparer.Ordinal);
    private readonly LaneSourceRequest request;
    private readonly HashSet<string> seen = new(StringComparer.Ordinal);
    private int next;

    private OpenLabelSource(string path, JsonDocument document, LaneSourceRequest request)
    {
        DisplayName = path;
        this.document = document;
        this.request = request;
        JsonElement root = document.RootElement;
        if (root.ValueKind != JsonValueKind.Object || !root.TryGetProperty("openlabel", out JsonElement ol) || ol.ValueKind != JsonValueKind.Object)
        {
            throw Error("openlabel", "the root must be an object with the key 'openlabel'");
        }

        if (!ol.TryGetProperty("metadata", out JsonElement meta) || meta.ValueKind != JsonValueKind.Object
            || !meta.TryGetProperty("schema_version", out JsonElement version) || version.ValueKind != JsonValueKind.String)
        {
            throw Error("openlabel.metadata.schema_version", "required key is missing");
        }

        if (version.GetString() != OpenLabel.SchemaVersion)
        {
            throw Error("openlabel.metadata.schema_version", $"'{version.GetString()}' is not supported (expected {OpenLabel.SchemaVersion})");
        }

        if (ol.TryGetProperty("objects", out JsonElement objects))
        {
            foreach (JsonProperty o in Members(objects, "openlabel.objects"))
            {
                string at = "openlabel.objects." + o.Name;
                if (!o.Value.TryGetProperty("name", out JsonElement n) || n.ValueKind != JsonValueKind.String)
                {
                    throw Error(at + ".name", "required key is missing or not a string");
                }

                if (!o.Value.TryGetProperty("type", out JsonElement t) || t.ValueKind != JsonValueKind.String)
                {
                    throw Error(at + ".type", "required key is missing or not a string");
                }

                typeByUid[o.Name] = t.GetString()!;
            }
        }

        if (ol.TryGetProperty("frames", out JsonElement fs))
        {
            foreach (JsonProperty f in Members(fs, "openlabel.frames"))
            {
                if (!long.TryParse(f.Name, NumberStyles.None, CultureInfo.InvariantCulture, out long number))
                {
                    throw Error("openlabel.frames." + f.Name, "frame keys must be whole frame numbers");
                }

                frames.Add((number, f.Value));
            }
        }

        frames.Sort((a, b) => a.Number.CompareTo(b.Number));
    }

    /// <inheritdoc />
    public string DisplayName { get; }

    /// <inheritdoc />
    public long RecordCount { get; private set; }

    /// <summary>Per-frame objects skipped because their type is not ours (counted over the frames read).</summary>
    public long SkippedObjects { get; private set; }

    /// <summary>Parses a file; throws <see cref="BadInputException"/> when it is missing or not valid JSON.</summary>
    public static OpenLabelSource Open(string path, LaneSourceRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "file not found");
        }

        JsonDocument doc;
        try
        {
            using FileStream s = File.OpenRead(IO.InputSpool.ReadablePath(path));
            doc = JsonDocument.Parse(s, new JsonDocumentOptions { MaxDepth = 64 });
        }
        catch (JsonException ex)
        {
            throw BadInputException.At(path, (ex.LineNumber ?? -1) + 1, "json", "invalid JSON: " + ex.Message.Split(" LineNumber:", 2)[0]);
        }
        catch (IOException ex)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }

        try
        {
            return new OpenLabelSource(path, doc, request);
        }
        catch
        {
            doc.Dispose();
            throw;
        }
    }

    /// <inheritdoc />
    public bool TryRead(out LaneRecord record)
    {
        try
        {
            return TryReadFrame(out record);
        }
        catch (InvalidOperationException)
        {
            // JsonElement.GetString on a string holding a lone UTF-16 surrogate escape
            throw Error("openlabel.frames." + frames[next - 1].Number.ToString(CultureInfo.InvariantCulture), "a string holds a lone UTF-16 surrogate escape (\\uD800-\\uDFFF without its pair), which is not text");
        }
    }

    private bool TryReadFrame(out LaneRecord record)
    {
        if (next >= frames.Count)
        {
            record = null!;
            return false;
        }

        (long number, JsonElement frame) = frames[next++];
        string at = "openlabel.frames." + number.ToString(CultureInfo.InvariantCulture);
        string key = number.ToString("000000", CultureInfo.InvariantCulture);
        int? width = null, height = null;
        var tags = new List<string>();
        var extra = new List<KeyValuePair<string, string>>();
        if (frame.ValueKind != JsonValueKind.Object)
        {
            throw Error(at, "a frame must be an object");
        }

        if (frame.TryGetProperty("frame_properties", out JsonElement props) && props.ValueKind == JsonValueKind.Object
            && props.TryGetProperty(OpenLabel.FramePropertiesKey, out JsonElement ours) && ours.ValueKind == JsonValueKind.Object)
        {
            string pat = at + ".frame_properties." + OpenLabel.FramePropertiesKey;
            if (ours.TryGetProperty("frame", out JsonElement fk))
            {
                key = fk.ValueKind == JsonValueKind.String && fk.GetString()!.Length > 0 ? fk.GetString()! : throw Error(pat + ".frame", "must be a non-empty string");
            }

            width = Size(ours, "width", pat);
            height = Size(ours, "height", pat);
            if (ours.TryGetProperty("tags", out JsonElement tg))
            {
                foreach (JsonElement t in Items(tg, pat + ".tags"))
                {
                    tags.Add(t.ValueKind == JsonValueKind.String ? t.GetString()! : throw Error(pat + ".tags", "expected strings"));
                }
            }

            if (ours.TryGetProperty("extra", out JsonElement ex))
            {
                foreach (JsonProperty p in Members(ex, pat + ".extra"))
                {
                    extra.Add(new(p.Name, p.Value.GetRawText()));
                }
            }
        }

        if (!seen.Add(key))
        {
            throw Error(at, $"duplicate frame '{key}'");
        }

        if (width is null || height is null)
        {
            if (request.Reference is { } r && r.TryGetValue(key, out var size))
            {
                (width, height) = (size.Width, size.Height);
            }
            else if (request.Size is { } s)
            {
                (width, height) = (s.Width, s.Height);
            }
            else if (request.SizeRequired)
            {
                throw Error(at, $"frame '{key}' has no size: give --size WxH or a reference lane file");
            }
        }

        var lanes = new List<Lane>();
        if (frame.TryGetProperty("objects", out JsonElement objs))
        {
            var ordered = Members(objs, at + ".objects").ToList();
            ordered.Sort((a, b) => CompareUid(a.Name, b.Name));
            foreach (JsonProperty o in ordered)
            {
                string oat = at + ".objects." + o.Name;
                if (!typeByUid.TryGetValue(o.Name, out string? type))
                {
                    throw Error(oat, $"object uid '{o.Name}' is not declared in openlabel.objects");
                }

                if (type != OpenLabel.LaneMarkingType)
                {
                    SkippedObjects++;
                    continue;
                }

                if (!o.Value.TryGetProperty("object_data", out JsonElement data) || !data.TryGetProperty("poly2d", out JsonElement polys))
                {
                    continue;
                }

                int k = 0;
                foreach (JsonElement poly in Items(polys, oat + ".object_data.poly2d"))
                {
                    if (lanes.Count == InputLimits.MaxLanesPerFrame)
                    {
                        throw Error(at, $"frame '{key}': more than {InputLimits.MaxLanesPerFrame} lanes in one frame (the documented limit)");
                    }

                    lanes.Add(ReadLane(poly, oat + ".object_data.poly2d[" + k.ToString(CultureInfo.InvariantCulture) + "]"));
                    k++;
                }
            }
        }

        record = new LaneRecord { Frame = key, Width = width, Height = height, Tags = tags, Lanes = lanes, ExtraJson = extra };
        if (width is int w && height is int h)
        {
            try
            {
                InputLimits.CheckFrameSize(DisplayName, 0, w, h);
                record.ValidatePointRange(DisplayName, w, h);
            }
            catch (BadInputException e)
            {
                throw Error(at, $"frame '{key}': " + e.Message[(e.Message.IndexOf(": ", StringComparison.Ordinal) + 2)..]);
            }
        }

        RecordCount++;
        return true;
    }

    private Lane ReadLane(JsonElement poly, string at)
    {
        if (poly.ValueKind != JsonValueKind.Object)
        {
            throw Error(at, "a poly2d item must be an object");
        }

        foreach (string required in new[] { "name", "val", "mode", "closed" })
        {
            if (!poly.TryGetProperty(required, out _))
            {
                throw Error(at + "." + required, "required key is missing");
            }
        }

        string? mode = poly.GetProperty("mode").ValueKind == JsonValueKind.String ? poly.GetProperty("mode").GetString() : null;
        if (mode != OpenLabel.AbsoluteMode)
        {
            throw Error(at + ".mode", $"'{mode}' is not supported (only {OpenLabel.AbsoluteMode})");
        }

        if (poly.GetProperty("closed").ValueKind == JsonValueKind.True)
        {
            throw Error(at + ".closed", "a lane marking is an open polyline (closed: false)");
        }

        var vals = new List<double>();
        foreach (JsonElement v in Items(poly.GetProperty("val"), at + ".val"))
        {
            if (v.ValueKind != JsonValueKind.Number || !v.TryGetDouble(out double d) || !double.IsFinite(d))
            {
                throw Error(at + ".val", "expected finite numbers x0, y0, x1, y1, ...");
            }

            vals.Add(d);
        }

        if (vals.Count % 2 != 0 || vals.Count < 4)
        {
            throw Error(at + ".val", string.Create(CultureInfo.InvariantCulture, $"needs an even count of at least 4 numbers (2 points), found {vals.Count}"));
        }

        var points = new List<LanePoint>(vals.Count / 2);
        for (int i = 0; i < vals.Count; i += 2)
        {
            points.Add(new LanePoint(vals[i], vals[i + 1]));
        }

        int? slot = null;
        double? score = null;
        string? kind = null;
        if (poly.TryGetProperty("attributes", out JsonElement attrs) && attrs.ValueKind == JsonValueKind.Object)
        {
            if (attrs.TryGetProperty("num", out JsonElement nums))
            {
                foreach (JsonElement n in Items(nums, at + ".attributes.num"))
                {
                    string? name = n.TryGetProperty("name", out JsonElement nn) && nn.ValueKind == JsonValueKind.String ? nn.GetString() : null;
                    if (!n.TryGetProperty("val", out JsonElement nv) || nv.ValueKind != JsonValueKind.Number)
                    {
                        if (name is "slot" or "score")
                        {
                            // validated like the lane file's keys (docs/metrics.md): a wrong type is an error, not a silent drop
                            throw Error(at + ".attributes.num." + name, "val must be a number");
                        }

                        continue; // other attributes are kept out of the lane file, whatever their type
                    }

                    double d = nv.GetDouble();
                    if (name == "slot")
                    {
                        slot = d == Math.Floor(d) && Math.Abs(d) <= 1000 ? (int)d : throw Error(at + ".attributes.num.slot", "must be an integer");
                    }
                    else if (name == "score")
                    {
                        score = d is >= 0 and <= 1 ? d : throw Error(at + ".attributes.num.score", "must be in [0, 1]");
                    }
                }
            }

            if (attrs.TryGetProperty("text", out JsonElement texts))
            {
                foreach (JsonElement t in Items(texts, at + ".attributes.text"))
                {
                    if (t.TryGetProperty("name", out JsonElement tn) && tn.ValueKind == JsonValueKind.String && tn.GetString() == "kind"
                        && !(t.TryGetProperty("val", out JsonElement kv) && kv.ValueKind == JsonValueKind.String))
                    {
                        throw Error(at + ".attributes.text.kind", "val must be a string");
                    }

                    if (t.TryGetProperty("name", out tn) && tn.ValueKind == JsonValueKind.String && tn.GetString() == "kind"
                        && t.TryGetProperty("val", out JsonElement tv) && tv.ValueKind == JsonValueKind.String)
                    {
                        kind = LaneKinds.IsValid(tv.GetString()!) ? tv.GetString() : throw Error(at + ".attributes.text.kind", $"'{tv.GetString()}' is not one of {string.Join(", ", LaneKinds.All)}");
                    }
                }
            }
        }

        var extra = new List<KeyValuePair<string, string>>();
        if (poly.TryGetProperty(OpenLabel.LaneExtraKey, out JsonElement ex))
        {
            foreach (JsonProperty p in Members(ex, at + "." + OpenLabel.LaneExtraKey))
            {
                extra.Add(new(p.Name, p.Value.GetRawText()));
            }
        }

        return new Lane { Points = points, Slot = slot, Score = score, Kind = kind, ExtraJson = extra };
    }

    private int? Size(JsonElement obj, string name, string at)
    {
        if (!obj.TryGetProperty(name, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
        {
            return null;
        }

        return v.ValueKind == JsonValueKind.Number && v.TryGetInt32(out int i) && i >= 1 ? i : throw Error(at + "." + name, "must be a positive whole number of pixels");
    }

    private static int CompareUid(string a, string b)
    {
        bool na = long.TryParse(a, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out long la);
        bool nb = long.TryParse(b, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out long lb);
        return na && nb ? la.CompareTo(lb) : na ? -1 : nb ? 1 : string.CompareOrdinal(a, b);
    }

    private JsonElement.ObjectEnumerator Members(JsonElement e, string at) =>
        e.ValueKind == JsonValueKind.Object ? e.EnumerateObject() : throw Error(at, "expected an object");

    private JsonElement.ArrayEnumerator Items(JsonElement e, string at) =>
        e.ValueKind == JsonValueKind.Array ? e.EnumerateArray() : throw Error(at, "expected an array");

    private BadInputException Error(string key, string problem) => BadInputException.At(DisplayName, 0, key, problem);

    /// <inheritdoc />
    public void Dispose() => document.Dispose();
}
