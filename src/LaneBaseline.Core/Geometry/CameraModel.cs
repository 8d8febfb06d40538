using System.Globalization;
using System.Text;
using System.Text.Json;

namespace LaneBaseline.Core.Geometry;

/// <summary>
/// A pinhole camera above a flat road, as stored in <c>camera.json</c> (schema: docs/camera-file.md): image size,
/// focal lengths and principal point in pixels, mounting height, pitch/yaw/roll, radial distortion, and the
/// derived ground↔image homographies with four control points.
/// </summary>
/// <remarks>
/// Ground frame: X forward, Y left, Z up, metres, origin on the ground straight below the camera. Image: pixel
/// (u, v), u right, v down, the centre of the top-left pixel is (0, 0). Pitch is positive when the camera looks
/// down, yaw positive to the left, roll positive when the image turns clockwise. The ground-to-image homography is
/// H = K · [r1 r2 −h·r3] with R the world-to-camera rotation (Hartley &amp; Zisserman, Multiple View Geometry,
/// 2nd ed., plane-induced homography), and maps to undistorted pixels; distortion
/// x_d = x (1 + k1 r² + k2 r⁴) applies to normalised coordinates after it.
/// </remarks>
public sealed record CameraModel
{
    /// <summary>
    /// File format version written to <c>camera.json</c> (<c>schema_version</c>, snake_case keys). Version 1 files
    /// (<c>version</c> 1 or absent, camelCase keys) are still read.
    /// </summary>
    public const int FormatVersion = 2;

    /// <summary>Image width in pixels.</summary>
    public required int ImageWidth { get; init; }

    /// <summary>Image height in pixels.</summary>
    public required int ImageHeight { get; init; }

    /// <summary>Horizontal focal length in pixels.</summary>
    public required double Fx { get; init; }

    /// <summary>Vertical focal length in pixels.</summary>
    public required double Fy { get; init; }

    /// <summary>Principal point column in pixels.</summary>
    public required double Cx { get; init; }

    /// <summary>Principal point row in pixels.</summary>
    public required double Cy { get; init; }

    /// <summary>Height of the camera centre above the road, metres.</summary>
    public required double MountHeightM { get; init; }

    /// <summary>Pitch in degrees, positive looking down.</summary>
    public double PitchDeg { get; init; }

    /// <summary>Yaw in degrees, positive looking left.</summary>
    public double YawDeg { get; init; }

    /// <summary>Roll in degrees, positive when the image content turns clockwise.</summary>
    public double RollDeg { get; init; }

    /// <summary>First radial distortion coefficient (negative: barrel).</summary>
    public double K1 { get; init; }

    /// <summary>Second radial distortion coefficient.</summary>
    public double K2 { get; init; }

    /// <summary>
    /// The default camera of the renderer for a frame size: focal length 0.78125 × width (1000 px at 1280),
    /// principal point at the image centre, 1.5 m high, pitched 2° down (the setup of docs/checks.md).
    /// </summary>
    public static CameraModel CreateDefault(int width, int height)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(width, 16);
        ArgumentOutOfRangeException.ThrowIfLessThan(height, 16);
        double f = width * 0.78125;
        return new CameraModel
        {
            ImageWidth = width,
            ImageHeight = height,
            Fx = f,
            Fy = f,
            Cx = width / 2.0,
            Cy = height / 2.0,
            MountHeightM = 1.5,
            PitchDeg = 2.0,
        };
    }

    /// <summary>Builds the fast projection object (rotation, homographies, distortion).</summary>
    public GroundProjection ToProjection() => new(this);

    /// <summary>Ground (X, Y, 1) to undistorted image homography (normalised, last entry 1).</summary>
    public Matrix3 GroundToImage => ToProjection().GroundToImage;

    /// <summary>Undistorted image to ground homography (normalised, last entry 1).</summary>
    public Matrix3 ImageToGroundHomography => ToProjection().ImageToGround;

    /// <summary>Projects a ground point (metres) to a pixel (including distortion).</summary>
    /// <exception cref="ArgumentOutOfRangeException">The point is behind the camera.</exception>
    public (double U, double V) ProjectGroundToImage(double groundXM, double groundYM)
    {
        if (!ToProjection().TryProjectGround(groundXM, groundYM, out double u, out double v))
        {
            throw new ArgumentOutOfRangeException(nameof(groundXM), "the ground point is behind the camera");
        }

        return (u, v);
    }

    /// <summary>Maps a pixel to the ground plane (metres).</summary>
    /// <exception cref="ArgumentOutOfRangeException">The pixel is at or above the horizon.</exception>
    public (double XM, double YM) ImageToGround(double u, double v)
    {
        if (!ToProjection().TryImageToGround(u, v, out double x, out double y))
        {
            throw new ArgumentOutOfRangeException(nameof(v), "the pixel is at or above the horizon");
        }

        return (x, y);
    }

    /// <summary>Image row of the horizon at the principal column (undistorted), pixels.</summary>
    public double HorizonRowAtCentre()
    {
        // The vanishing point of the forward direction: project a very distant ground point.
        ToProjection().TryProjectGround(1e7, 0, out _, out double v);
        return v;
    }

    /// <summary>
    /// Four image points with their ground coordinates, spread over the road area of the image (two rows, two
    /// columns) so that a user can check or re-estimate the homography.
    /// </summary>
    public IReadOnlyList<CameraControlPoint> ControlPoints()
    {
        GroundProjection p = ToProjection();
        double horizon = Math.Max(HorizonRowAtCentre(), 0);
        double bottom = ImageHeight - 1;
        double[] rows = [bottom - (0.1 * (bottom - horizon)), horizon + (0.35 * (bottom - horizon))];
        double[] cols = [ImageWidth * 0.35, ImageWidth * 0.65];
        var list = new List<CameraControlPoint>(4);
        foreach (double v in rows)
        {
            foreach (double u in cols)
            {
                if (p.TryImageToGround(u, v, out double x, out double y))
                {
                    list.Add(new CameraControlPoint(u, v, x, y));
                }
            }
        }

        return list;
    }

    /// <summary>Checks ranges; returns null when valid, else "key: problem".</summary>
    public string? Validate()
    {
        if (ImageWidth < 16 || ImageWidth > 16384)
        {
            return "imageWidth: must be between 16 and 16384 pixels";
        }

        if (ImageHeight < 16 || ImageHeight > 16384)
        {
            return "imageHeight: must be between 16 and 16384 pixels";
        }

        if (!(Fx > 0) || !double.IsFinite(Fx))
        {
            return "fx: must be a positive number of pixels";
        }

        if (!(Fy > 0) || !double.IsFinite(Fy))
        {
            return "fy: must be a positive number of pixels";
        }

        if (!double.IsFinite(Cx) || !double.IsFinite(Cy))
        {
            return "cx/cy: must be finite";
        }

        if (!(MountHeightM > 0) || MountHeightM > 100)
        {
            return "mountHeightM: must be in (0, 100] metres";
        }

        if (!(Math.Abs(PitchDeg) < 60))
        {
            return "pitchDeg: must be in (-60, 60) degrees";
        }

        if (!(Math.Abs(YawDeg) < 60))
        {
            return "yawDeg: must be in (-60, 60) degrees";
        }

        if (!(Math.Abs(RollDeg) < 45))
        {
            return "rollDeg: must be in (-45, 45) degrees";
        }

        if (!(Math.Abs(K1) <= 2) || !(Math.Abs(K2) <= 2))
        {
            return "k1/k2: must be in [-2, 2]";
        }

        return null;
    }

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

    private static void ProjectGroundToImageDistorted(GroundProjection p, CameraControlPoint c, out double u, out double v)
    {
        // Control points are stored as the distorted pixel where the ground point appears.
        p.TryProjectGround(c.GroundXM, c.GroundYM, out u, out v);
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
