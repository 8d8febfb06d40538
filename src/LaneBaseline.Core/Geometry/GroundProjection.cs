namespace LaneBaseline.Core.Geometry;

/// <summary>
/// The precomputed projection of a <see cref="CameraModel"/>: rotation, homographies and distortion, for fast
/// per-point use. Build it once with <see cref="CameraModel.ToProjection"/>.
/// </summary>
/// <remarks>
/// Ground frame: X forward, Y left, Z up, metres, origin on the ground below the camera. Camera frame: x right,
/// y down, z along the optical axis. Image: pixel (u, v), u right, v down, centre of the top-left pixel (0, 0).
/// The homographies map ground (X, Y, 1) to undistorted pixels; radial distortion is applied after them.
/// </remarks>
public readonly struct GroundProjection
{
    private readonly double fx, fy, cx, cy, k1, k2, heightM, maxR2;

    internal GroundProjection(CameraModel camera)
    {
        fx = camera.Fx;
        fy = camera.Fy;
        cx = camera.Cx;
        cy = camera.Cy;
        k1 = camera.K1;
        k2 = camera.K2;
        heightM = camera.MountHeightM;
        Rotation = BuildRotation(camera.PitchDeg, camera.YawDeg, camera.RollDeg);
        var k = new Matrix3(fx, 0, cx, 0, fy, cy, 0, 0, 1);
        Matrix3 r = Rotation;
        // [r1 r2 t] with t = -R·C, C = (0, 0, h) the camera centre, so t = -h·r3.
        var rt = new Matrix3(r.M00, r.M01, -heightM * r.M02, r.M10, r.M11, -heightM * r.M12, r.M20, r.M21, -heightM * r.M22);
        GroundToImage = (k * rt).NormalizedHomography();
        ImageToGround = GroundToImage.Inverse().NormalizedHomography();
        // Barrel distortion r(1 + k1 r^2 + k2 r^4) stops growing where its derivative is zero; beyond it we clamp
        // so that far off-screen points cannot fold back into the frame.
        maxR2 = double.PositiveInfinity;
        if (k1 < 0 || k2 < 0)
        {
            for (double r2 = 0.01; r2 < 100; r2 += 0.01)
            {
                if (1 + (3 * k1 * r2) + (5 * k2 * r2 * r2) <= 0)
                {
                    maxR2 = r2 - 0.01;
                    break;
                }
            }
        }
    }

    /// <summary>World-to-camera rotation R (camera = R · (P − C)).</summary>
    public Matrix3 Rotation { get; }

    /// <summary>Ground (X, Y, 1) to undistorted pixel homography, normalised so its last entry is 1.</summary>
    public Matrix3 GroundToImage { get; }

    /// <summary>Undistorted pixel to ground homography (inverse of <see cref="GroundToImage"/>).</summary>
    public Matrix3 ImageToGround { get; }

    /// <summary>Whether the camera has radial distortion.</summary>
    public bool HasDistortion => k1 != 0 || k2 != 0;

    /// <summary>
    /// Rotation for pitch (down positive), yaw (left positive) and roll (clockwise in the image positive), applied
    /// to the base axes that turn X forward / Y left / Z up into camera x right / y down / z forward.
    /// </summary>
    public static Matrix3 BuildRotation(double pitchDeg, double yawDeg, double rollDeg)
    {
        double p = pitchDeg * Math.PI / 180, y = yawDeg * Math.PI / 180, r = rollDeg * Math.PI / 180;
        var yaw = new Matrix3(Math.Cos(y), Math.Sin(y), 0, -Math.Sin(y), Math.Cos(y), 0, 0, 0, 1);
        var baseAxes = new Matrix3(0, -1, 0, 0, 0, -1, 1, 0, 0);
        var pitch = new Matrix3(1, 0, 0, 0, Math.Cos(p), -Math.Sin(p), 0, Math.Sin(p), Math.Cos(p));
        var roll = new Matrix3(Math.Cos(r), -Math.Sin(r), 0, Math.Sin(r), Math.Cos(r), 0, 0, 0, 1);
        return roll * (pitch * (baseAxes * yaw));
    }

    /// <summary>Projects a 3D point (ground frame, metres) to a pixel; false when it is behind the camera.</summary>
    public bool TryProject(double x, double y, double z, out double u, out double v)
    {
        (double xc, double yc, double zc) = Rotation.Apply(x, y, z - heightM);
        if (zc <= 1e-6)
        {
            u = v = double.NaN;
            return false;
        }

        double nx = xc / zc, ny = yc / zc;
        Distort(ref nx, ref ny);
        u = (fx * nx) + cx;
        v = (fy * ny) + cy;
        return true;
    }

    /// <summary>Projects a ground point (Z = 0) to a pixel; false when it is behind the camera.</summary>
    public bool TryProjectGround(double x, double y, out double u, out double v) => TryProject(x, y, 0, out u, out v);

    /// <summary>Maps a pixel to the ground plane; false when its ray does not meet the ground ahead (at or above the horizon).</summary>
    public bool TryImageToGround(double u, double v, out double x, out double y)
    {
        double nx = (u - cx) / fx, ny = (v - cy) / fy;
        Undistort(ref nx, ref ny);
        // Ray direction in the ground frame: R^T · (nx, ny, 1).
        Matrix3 r = Rotation;
        double dz = (r.M02 * nx) + (r.M12 * ny) + r.M22;
        if (dz >= -1e-9)
        {
            x = y = double.NaN;
            return false;
        }

        double dx = (r.M00 * nx) + (r.M10 * ny) + r.M20;
        double dy = (r.M01 * nx) + (r.M11 * ny) + r.M21;
        double t = heightM / -dz;
        x = dx * t;
        y = dy * t;
        return true;
    }

    private void Distort(ref double nx, ref double ny)
    {
        if (k1 == 0 && k2 == 0)
        {
            return;
        }

        double r2 = (nx * nx) + (ny * ny);
        double scale;
        if (r2 <= maxR2)
        {
            scale = 1 + (k1 * r2) + (k2 * r2 * r2);
        }
        else
        {
            double rMax = Math.Sqrt(maxR2);
            double edge = rMax * (1 + (k1 * maxR2) + (k2 * maxR2 * maxR2));
            double r = Math.Sqrt(r2);
            scale = (edge + (0.05 * (r - rMax))) / r;
        }

        nx *= scale;
        ny *= scale;
    }

    private void Undistort(ref double nx, ref double ny)
    {
        if (k1 == 0 && k2 == 0)
        {
            return;
        }

        double rd = Math.Sqrt((nx * nx) + (ny * ny));
        if (rd < 1e-15)
        {
            return;
        }

        double r;
        double rMax = Math.Sqrt(maxR2);
        double edge = double.IsPositiveInfinity(maxR2) ? double.PositiveInfinity : rMax * (1 + (k1 * maxR2) + (k2 * maxR2 * maxR2));
        if (rd > edge)
        {
            r = rMax + ((rd - edge) / 0.05);
        }
        else
        {
            // Newton's method on g(r) = r (1 + k1 r^2 + k2 r^4) - rd, monotonic on [0, rMax].
            r = Math.Min(rd, rMax);
            for (int i = 0; i < 60; i++)
            {
                double r2 = r * r;
                double g = (r * (1 + (k1 * r2) + (k2 * r2 * r2))) - rd;
                double dg = 1 + (3 * k1 * r2) + (5 * k2 * r2 * r2);
                double step = g / Math.Max(dg, 1e-9);
                r = Math.Clamp(r - step, 0, rMax);
                if (Math.Abs(step) < 1e-15)
                {
                    break;
                }
            }
        }

        double scale = r / rd;
        nx *= scale;
        ny *= scale;
    }
}
