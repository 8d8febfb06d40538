using System.Globalization;
using System.Text;
using System.Text.Json;

namespace LaneBaseline.Core.Geometry;

/// <summary>The camera file: writing it and reading it back with errors that name the file and the key.</summary>
public sealed partial record CameraModel
{
    /// <summary>Writes the camera file (temporary file, then rename, so no half-written file is left).</summary>
    public void Save(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        IO.AtomicFile.WriteAllText(path, ToJson());
    }

    /// <summary>The camera file's JSON text (indented, invariant culture, ends with a newline).</summary>
    public string ToJson()
    {
        GroundProjection p = ToProjection();
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteString("tool", "lanebaseline");
            w.WriteNumber("schema_version", FormatVersion);
            w.WriteString("ground_frame", "X forward, Y left, Z up, metres; origin on the road below the camera");
            w.WriteString("image_frame", "u right, v down, pixels; centre of the top-left pixel is (0, 0)");
            w.WriteNumber("image_width", ImageWidth);
            w.WriteNumber("image_height", ImageHeight);
            w.WriteNumber("fx", Fx);
            w.WriteNumber("fy", Fy);
            w.WriteNumber("cx", Cx);
            w.WriteNumber("cy", Cy);
            w.WriteNumber("mount_height_m", MountHeightM);
            w.WriteNumber("pitch_deg", PitchDeg);
            w.WriteNumber("yaw_deg", YawDeg);
            w.WriteNumber("roll_deg", RollDeg);
            w.WriteNumber("k1", K1);
            w.WriteNumber("k2", K2);
            WriteMatrix(w, "ground_to_image", p.GroundToImage);
            WriteMatrix(w, "image_to_ground", p.ImageToGround);
            w.WriteStartArray("control_points");
            foreach (CameraControlPoint c in ControlPoints())
            {
                ProjectGroundToImageDistorted(p, c, out double ud, out double vd);
                w.WriteStartObject();
                w.WriteNumber("u", Math.Round(ud, 4));
                w.WriteNumber("v", Math.Round(vd, 4));
                w.WriteNumber("ground_x_m", Math.Round(c.GroundXM, 6));
                w.WriteNumber("ground_y_m", Math.Round(c.GroundYM, 6));
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteEndObject();
        }

        return Encoding.UTF8.GetString(ms.ToArray()) + "\n";
    }

    private static void WriteMatrix(Utf8JsonWriter w, string name, Matrix3 m)
    {
        w.WriteStartArray(name);
        foreach (double x in m.ToRowMajor())
        {
            w.WriteNumberValue(x);
        }

        w.WriteEndArray();
    }

    /// <summary>
    /// Reads and validates a camera file. The homographies and control points in the file are optional; when
    /// present they must agree with the parameters (relative tolerance 1e-4), so a stale file is caught.
    /// </summary>
    /// <exception cref="BadInputException">The file is missing, not JSON, lacks a key or holds a bad value.</exception>
    public static CameraModel Load(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        string text;
        try
        {
            text = File.ReadAllText(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot read the camera file: " + ex.Message);
        }

        return Parse(text, path);
    }

    /// <summary>Parses camera-file text; <paramref name="fileName"/> names the source in error messages.</summary>
    public static CameraModel Parse(string text, string fileName)
    {
        ArgumentNullException.ThrowIfNull(text);
        using JsonDocument doc = ParseDocument(text, fileName);
        {
            JsonElement root = doc.RootElement;
            if (root.ValueKind != JsonValueKind.Object)
            {
                throw BadInputException.At(fileName, 0, null, "the camera file must hold one JSON object");
            }

            // Version 2 (written since 2026-12-05) names itself with schema_version and uses snake_case keys;
            // version 1 (version 1 or no version key, camelCase) is what earlier builds wrote and users keep.
            bool v2 = root.TryGetProperty("schema_version", out JsonElement schema);
            if (v2 && (schema.ValueKind != JsonValueKind.Number || !schema.TryGetInt32(out int sv) || sv != FormatVersion))
            {
                throw BadInputException.At(fileName, 0, "schema_version", "unsupported version (this build reads versions 1 and 2)");
            }

            if (!v2 && root.TryGetProperty("version", out JsonElement ver) &&
                (ver.ValueKind != JsonValueKind.Number || !ver.TryGetInt32(out int version) || version != 1))
            {
                throw BadInputException.At(fileName, 0, "version", "unsupported version (this build reads versions 1 and 2)");
            }

            Func<string, string> key = v2 ? SnakeCase : k => k;
            var camera = new CameraModel
            {
                ImageWidth = ReadInt(root, key("imageWidth"), fileName),
                ImageHeight = ReadInt(root, key("imageHeight"), fileName),
                Fx = ReadNumber(root, "fx", fileName, null),
                Fy = ReadNumber(root, "fy", fileName, null),
                Cx = ReadNumber(root, "cx", fileName, null),
                Cy = ReadNumber(root, "cy", fileName, null),
                MountHeightM = ReadNumber(root, key("mountHeightM"), fileName, null),
                PitchDeg = ReadNumber(root, key("pitchDeg"), fileName, 0),
                YawDeg = ReadNumber(root, key("yawDeg"), fileName, 0),
                RollDeg = ReadNumber(root, key("rollDeg"), fileName, 0),
                K1 = ReadNumber(root, "k1", fileName, 0),
                K2 = ReadNumber(root, "k2", fileName, 0),
            };
            string? problem = camera.Validate();
            if (problem is not null)
            {
                int colon = problem.IndexOf(':', StringComparison.Ordinal);
                throw BadInputException.At(fileName, 0, key(problem[..colon]), problem[(colon + 2)..]);
            }

            GroundProjection p = camera.ToProjection();
            CheckMatrix(root, key("groundToImage"), p.GroundToImage, fileName);
            CheckMatrix(root, key("imageToGround"), p.ImageToGround, fileName);
            return camera;
        }
    }

    /// <summary>The version 2 key of a version 1 key: <c>mountHeightM</c> → <c>mount_height_m</c>.</summary>
    private static string SnakeCase(string camel)
    {
        var b = new StringBuilder(camel.Length + 4);
        foreach (char c in camel)
        {
            if (char.IsAsciiLetterUpper(c))
            {
                b.Append('_').Append(char.ToLowerInvariant(c));
            }
            else
            {
                b.Append(c);
            }
        }

        return b.ToString();
    }

    private static JsonDocument ParseDocument(string text, string fileName)
    {
        try
        {
            return JsonDocument.Parse(text);
        }
        catch (JsonException ex)
        {
            long line = (ex.LineNumber ?? 0) + 1;
            throw BadInputException.At(fileName, line, null, "not valid JSON: " + ex.Message);
        }
    }

    private static void CheckMatrix(JsonElement root, string key, Matrix3 expected, string fileName)
    {
        if (!root.TryGetProperty(key, out JsonElement arr))
        {
            return;
        }

        if (arr.ValueKind != JsonValueKind.Array || arr.GetArrayLength() != 9)
        {
            throw BadInputException.At(fileName, 0, key, "must be an array of 9 numbers (row-major 3x3)");
        }

        double[] want = expected.ToRowMajor();
        double scale = want.Max(Math.Abs);
        for (int i = 0; i < 9; i++)
        {
            JsonElement e = arr[i];
            if (e.ValueKind != JsonValueKind.Number || !double.IsFinite(e.GetDouble()))
            {
                throw BadInputException.At(fileName, 0, $"{key}[{i.ToString(CultureInfo.InvariantCulture)}]", "must be a finite number");
            }

            if (Math.Abs(e.GetDouble() - want[i]) > 1e-4 * scale)
            {
                throw BadInputException.At(
                    fileName,
                    0,
                    $"{key}[{i.ToString(CultureInfo.InvariantCulture)}]",
                    string.Create(CultureInfo.InvariantCulture, $"{e.GetDouble()} disagrees with the camera parameters (expected {want[i]:G9}); remove the matrix or fix the parameters"));
            }
        }
    }

    private static int ReadInt(JsonElement root, string key, string fileName)
    {
        if (!root.TryGetProperty(key, out JsonElement e))
        {
            throw BadInputException.At(fileName, 0, key, "required key is missing");
        }

        if (e.ValueKind != JsonValueKind.Number || !e.TryGetInt32(out int value))
        {
            throw BadInputException.At(fileName, 0, key, "must be an integer");
        }

        return value;
    }

    private static double ReadNumber(JsonElement root, string key, string fileName, double? defaultValue)
    {
        if (!root.TryGetProperty(key, out JsonElement e))
        {
            return defaultValue ?? throw BadInputException.At(fileName, 0, key, "required key is missing");
        }

        if (e.ValueKind != JsonValueKind.Number)
        {
            throw BadInputException.At(fileName, 0, key, "must be a number");
        }

        double value = e.GetDouble();
        if (!double.IsFinite(value))
        {
            throw BadInputException.At(fileName, 0, key, "must be finite");
        }

        return value;
    }
}
