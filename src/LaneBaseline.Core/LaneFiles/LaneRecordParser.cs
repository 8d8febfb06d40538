using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.Unicode;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>Parses one line of a lane file into a <see cref="LaneRecord"/>, naming file, line and key on errors.</summary>
internal static class LaneRecordParser
{
    private static readonly JsonReaderOptions ReaderOptions = new() { CommentHandling = JsonCommentHandling.Disallow, MaxDepth = 16 };

    public static LaneRecord Parse(ReadOnlySpan<byte> line, string file, long lineNumber, bool sizeRequired)
    {
        if (!Utf8.IsValid(line))
        {
            throw BadInputException.At(file, lineNumber, null, "the line is not valid UTF-8 text");
        }

        var state = new State(file, lineNumber);
        var reader = new Utf8JsonReader(line, isFinalBlock: true, new JsonReaderState(ReaderOptions));
        try
        {
            LaneRecord record = ReadRecord(ref reader, line, state, sizeRequired);
            if (reader.Read())
            {
                throw state.Error(null, "extra content after the JSON object");
            }

            return record;
        }
        catch (JsonException ex)
        {
            throw state.Error(state.Key ?? "json", "invalid JSON: " + CleanJsonMessage(ex.Message));
        }
    }

    private static string CleanJsonMessage(string message)
    {
        int cut = message.IndexOf(" LineNumber:", StringComparison.Ordinal);
        if (cut < 0)
        {
            return message;
        }

        int pos = message.IndexOf("BytePositionInLine:", cut, StringComparison.Ordinal);
        string at = pos < 0 ? string.Empty : " (at byte " + message[(pos + 19)..].Trim().TrimEnd('.') + ")";
        return message[..cut].TrimEnd() + at;
    }

    private static LaneRecord ReadRecord(ref Utf8JsonReader reader, ReadOnlySpan<byte> line, State state, bool sizeRequired)
    {
        if (!reader.Read() || reader.TokenType != JsonTokenType.StartObject)
        {
            throw state.Error(null, "the line is not a JSON object");
        }

        string? frame = null;
        int? width = null, height = null;
        List<string>? tags = null;
        List<Lane>? lanes = null;
        List<KeyValuePair<string, string>>? extra = null;
        var seen = new HashSet<string>(StringComparer.Ordinal);

        while (true)
        {
            state.Key = null;
            reader.Read();
            if (reader.TokenType == JsonTokenType.EndObject)
            {
                break;
            }

            string name = GetText(ref reader, state, "key");
            state.Key = name;
            if (!seen.Add(name))
            {
                throw state.Error(name, "key appears twice in one record");
            }

            reader.Read();
            switch (name)
            {
                case "frame":
                    frame = ReadString(ref reader, state, "frame");
                    if (frame.Length == 0)
                    {
                        throw state.Error("frame", "must be a non-empty string");
                    }

                    break;
                case "width":
                    width = ReadSize(ref reader, state, "width");
                    break;
                case "height":
                    height = ReadSize(ref reader, state, "height");
                    break;
                case "tags":
                    tags = ReadTags(ref reader, state);
                    break;
                case "lanes":
                    lanes = ReadLanes(ref reader, line, state);
                    break;
                default:
                    (extra ??= []).Add(new(name, ReadRaw(ref reader, line)));
                    break;
            }
        }

        state.Key = null;
        if (frame is null)
        {
            throw state.Error("frame", "required key is missing");
        }

        if (lanes is null)
        {
            throw state.Error("lanes", "required key is missing");
        }

        if (sizeRequired && width is null)
        {
            throw state.Error("width", "required key is missing");
        }

        if (sizeRequired && height is null)
        {
            throw state.Error("height", "required key is missing");
        }

        var record = new LaneRecord
        {
            Frame = frame,
            Width = width,
            Height = height,
            Tags = tags ?? [],
            Lanes = lanes,
            ExtraJson = extra ?? [],
            LineNumber = state.Line,
        };
        if (width is int w && height is int h)
        {
            InputLimits.CheckFrameSize(state.File, state.Line, w, h);
            record.ValidatePointRange(state.File, w, h);
        }

        return record;
    }

    private static List<Lane> ReadLanes(ref Utf8JsonReader reader, ReadOnlySpan<byte> line, State state)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw state.Error("lanes", "expected an array of lane objects");
        }

        var lanes = new List<Lane>();
        while (true)
        {
            reader.Read();
            if (reader.TokenType == JsonTokenType.EndArray)
            {
                return lanes;
            }

            if (lanes.Count == InputLimits.MaxLanesPerFrame)
            {
                throw state.Error("lanes", string.Create(CultureInfo.InvariantCulture, $"more than {InputLimits.MaxLanesPerFrame} lanes in one frame (the documented limit)"));
            }

            string laneKey = "lanes[" + lanes.Count.ToString(CultureInfo.InvariantCulture) + "]";
            state.Key = laneKey;
            lanes.Add(ReadLane(ref reader, line, state, laneKey));
        }
    }

    private static Lane ReadLane(ref Utf8JsonReader reader, ReadOnlySpan<byte> line, State state, string laneKey)
    {
        if (reader.TokenType != JsonTokenType.StartObject)
        {
            throw state.Error(laneKey, "expected a lane object");
        }

        LanePoint[]? points = null;
        int? slot = null;
        double? score = null;
        string? kind = null;
        List<KeyValuePair<string, string>>? extra = null;
        var seen = new HashSet<string>(StringComparer.Ordinal);
        while (true)
        {
            state.Key = laneKey;
            reader.Read();
            if (reader.TokenType == JsonTokenType.EndObject)
            {
                break;
            }

            string name = GetText(ref reader, state, laneKey);
            string key = laneKey + "." + name;
            state.Key = key;
            if (!seen.Add(name))
            {
                throw state.Error(key, "key appears twice in one lane");
            }

            reader.Read();
            switch (name)
            {
                case "points":
                    points = ReadPoints(ref reader, state, key);
                    break;
                case "slot":
                    slot = ReadSlot(ref reader, state, key);
                    break;
                case "score":
                    score = ReadScore(ref reader, state, key);
                    break;
                case "kind":
                    if (reader.TokenType != JsonTokenType.Null)
                    {
                        kind = ReadString(ref reader, state, key);
                        if (!LaneKinds.IsValid(kind))
                        {
                            throw state.Error(key, $"'{kind}' is not one of {string.Join(", ", LaneKinds.All)}");
                        }
                    }

                    break;
                default:
                    (extra ??= []).Add(new(name, ReadRaw(ref reader, line)));
                    break;
            }
        }

        if (points is null)
        {
            throw state.Error(laneKey + ".points", "required key is missing");
        }

        if (points.Length < 2)
        {
            throw state.Error(laneKey + ".points", $"a lane needs at least 2 points, found {points.Length.ToString(CultureInfo.InvariantCulture)}");
        }

        return new Lane { Points = points, Slot = slot, Score = score, Kind = kind, ExtraJson = extra ?? [] };
    }

    private static LanePoint[] ReadPoints(ref Utf8JsonReader reader, State state, string key)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw state.Error(key, "expected an array of [x, y] points");
        }

        List<LanePoint> points = state.PointScratch;
        points.Clear();
        while (true)
        {
            state.AtPoint(key, points.Count);
            reader.Read();
            if (reader.TokenType == JsonTokenType.EndArray)
            {
                return [.. points];
            }

            if (reader.TokenType != JsonTokenType.StartArray)
            {
                throw state.Error(state.Key, "a point must be an array [x, y]");
            }

            reader.Read();
            double x = ReadFinite(ref reader, state, null);
            reader.Read();
            double y = ReadFinite(ref reader, state, null);
            reader.Read();
            if (reader.TokenType != JsonTokenType.EndArray)
            {
                throw state.Error(state.Key, "a point must have exactly two numbers [x, y]");
            }

            points.Add(new LanePoint(x, y));
        }
    }

    private static double ReadFinite(ref Utf8JsonReader reader, State state, string? key)
    {
        key ??= state.Key;
        if (reader.TokenType != JsonTokenType.Number)
        {
            throw state.Error(key, reader.TokenType == JsonTokenType.EndArray
                ? "a point must have exactly two numbers [x, y]"
                : "expected a number");
        }

        if (!reader.TryGetDouble(out double value) || !double.IsFinite(value))
        {
            throw state.Error(key, "non-finite number");
        }

        return value;
    }

    private static int? ReadSlot(ref Utf8JsonReader reader, State state, string key)
    {
        if (reader.TokenType == JsonTokenType.Null)
        {
            return null;
        }

        double v = ReadFinite(ref reader, state, key);
        if (v != Math.Floor(v) || Math.Abs(v) > 1000)
        {
            throw state.Error(key, "must be an integer (-1/+1 ego boundaries, ±2 next)");
        }

        return (int)v;
    }

    private static double? ReadScore(ref Utf8JsonReader reader, State state, string key)
    {
        if (reader.TokenType == JsonTokenType.Null)
        {
            return null;
        }

        double v = ReadFinite(ref reader, state, key);
        if (v < 0 || v > 1)
        {
            throw state.Error(key, string.Create(CultureInfo.InvariantCulture, $"confidence {v} is outside [0, 1]"));
        }

        return v;
    }

    private static int? ReadSize(ref Utf8JsonReader reader, State state, string key)
    {
        if (reader.TokenType == JsonTokenType.Null)
        {
            return null;
        }

        double v = ReadFinite(ref reader, state, key);
        if (v != Math.Floor(v) || v < 1 || v > 1 << 20)
        {
            throw state.Error(key, string.Create(CultureInfo.InvariantCulture, $"must be a positive whole number of pixels, found {v}"));
        }

        return (int)v;
    }

    private static List<string> ReadTags(ref Utf8JsonReader reader, State state)
    {
        var tags = new List<string>();
        if (reader.TokenType == JsonTokenType.Null)
        {
            return tags;
        }

        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw state.Error("tags", "expected an array of strings");
        }

        while (true)
        {
            reader.Read();
            if (reader.TokenType == JsonTokenType.EndArray)
            {
                return tags;
            }

            string key = "tags[" + tags.Count.ToString(CultureInfo.InvariantCulture) + "]";
            state.Key = key;
            tags.Add(ReadString(ref reader, state, key));
        }
    }

    private static string ReadString(ref Utf8JsonReader reader, State state, string key)
    {
        if (reader.TokenType != JsonTokenType.String)
        {
            throw state.Error(key, "expected a string");
        }

        return GetText(ref reader, state, key);
    }

    /// <summary>The current string token; a lone UTF-16 surrogate escape (<c>\uD800</c> without its pair) is bad input.</summary>
    private static string GetText(ref Utf8JsonReader reader, State state, string key)
    {
        try
        {
            return reader.GetString()!;
        }
        catch (InvalidOperationException)
        {
            throw state.Error(key, "the string holds a lone UTF-16 surrogate escape (\\uD800-\\uDFFF without its pair), which is not text");
        }
    }

    private static string ReadRaw(ref Utf8JsonReader reader, ReadOnlySpan<byte> line)
    {
        int start = (int)reader.TokenStartIndex;
        reader.Skip();
        int end = (int)reader.BytesConsumed;
        return Encoding.UTF8.GetString(line[start..end]);
    }

    private sealed class State(string file, long line)
    {
        public string File { get; } = file;

        public long Line { get; } = line;

        private string? key;
        private string? pointBase;
        private int pointIndex;

        /// <summary>The key being read, for error messages; a point's key is only built when an error needs it.</summary>
        public string? Key
        {
            get => pointBase is null ? key : pointBase + "[" + pointIndex.ToString(CultureInfo.InvariantCulture) + "]";
            set
            {
                key = value;
                pointBase = null;
            }
        }

        /// <summary>Reused while one lane's points are read; copied to an exact-size array.</summary>
        public List<LanePoint> PointScratch { get; } = [];

        public void AtPoint(string lanePointsKey, int index)
        {
            pointBase = lanePointsKey;
            pointIndex = index;
        }

        public BadInputException Error(string? key, string problem) => BadInputException.At(File, Line, key, problem);
    }
}
