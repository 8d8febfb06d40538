
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
public sealed partial record CameraModel
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

    private static void ProjectGroundToImageDistorted(GroundProjection p, CameraControlPoint c, out double u, out double v)
    {
        // Control points are stored as the distorted pixel where the ground point appears.
        p.TryProjectGround(c.GroundXM, c.GroundYM, out u, out v);
    }
}
