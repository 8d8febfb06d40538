using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Random;

namespace LaneBaseline.Testing;

/// <summary>
/// Clean lane truth for tests, from a flat road seen by a pinhole camera (until the renderer lands in main): the
/// camera of docs/checks.md (f = 1000 px, principal point (640, 360), 1280x720, height 1.5 m, pitch θ down),
/// vehicle frame X forward, Y left, ground-to-image homography
/// H = K · [[0,−1,0],[−sin θ,0,h cos θ],[cos θ,0,h sin θ]] (Hartley &amp; Zisserman, 2nd ed.; Zhang, IEEE PAMI 2000).
/// Four boundaries (slots −2, −1, +1, +2) of lanes of one width per sequence in the published band, a constant
/// curvature with radius at least 600 m, and the vehicle weaving ±0.3 m with a 5-8 s period (at most 0.38 m/s sideways).
/// </summary>
public static class SyntheticRoad
{
    /// <summary>Camera height, m.</summary>
    public const double CameraHeightM = 1.5;

    /// <summary>Projects a ground point (X forward, Y left, metres) to pixels (u right, v down).</summary>
    public static (double U, double V) Project(double x, double y, double pitchDeg = 2.0)
    {
        double t = pitchDeg * Math.PI / 180, s = Math.Sin(t), c = Math.Cos(t);
        double r1 = -y, r2 = (-s * x) + (CameraHeightM * c), r3 = (c * x) + (CameraHeightM * s);
        return ((1000 * r1 / r3) + 640, (1000 * r2 / r3) + 360);
    }

    /// <summary>Lane parameters of one sequence.</summary>
    public sealed record Scene(double LaneWidthM, double CurvaturePerM, double WeaveAmplitudeM, double WeavePeriodS, double WeavePhase);

    /// <summary>Draws a scene from a seed: width uniform in [3.0, 3.75] m, |curvature| ≤ 1/600 m⁻¹.</summary>
    public static Scene SceneFor(ulong seed, int sequence)
    {
        var rng = SplitMix64.ForStream(seed, (ulong)sequence);
        return new Scene(rng.NextDouble(3.0, 3.75), rng.NextDouble(-1.0 / 600, 1.0 / 600), 0.3, rng.NextDouble(5, 8), rng.NextDouble(0, 2 * Math.PI));
    }

    /// <summary>Lateral ground position of the boundary with a slot at distance x (Y left, metres).</summary>
    public static double BoundaryY(Scene scene, int slot, double offsetM, double x)
    {
        double k = slot < 0 ? -slot - 0.5 : -(slot - 0.5);
        return (k * scene.LaneWidthM) - offsetM + (scene.CurvaturePerM * x * x / 2);
    }

    /// <summary>The vehicle's lateral offset at frame i (30 fps), metres.</summary>
    public static double Offset(Scene scene, int frame) =>
        scene.WeaveAmplitudeM * Math.Sin((2 * Math.PI * frame / 30.0 / scene.WeavePeriodS) + scene.WeavePhase);

    /// <summary>A ground lane projected into the 1280x720 frame, near to far; points outside the frame are dropped.</summary>
    public static Lane? ProjectLane(Func<double, double> yOfX, int? slot)
    {
        var pts = new List<LanePoint>();
        for (double x = 3; x <= 70; x *= 1.08)
        {
            (double u, double v) = Project(x, yOfX(x));
            if (u >= 0 && u <= 1279 && v >= 0 && v <= 719)
            {
                pts.Add(new LanePoint(Math.Round(u, 3), Math.Round(v, 3)));
            }
        }

        return pts.Count >= 2 ? new Lane { Points = pts, Slot = slot } : null;
    }

    /// <summary>One frame of a sequence; <paramref name="edit"/> may change a boundary's ground curve Y(X) by slot.</summary>
    public static LaneRecord Frame(Scene scene, int sequence, int frame, Func<int, Func<double, double>, Func<double, double>>? edit = null)
    {
        double d = Offset(scene, frame);
        var lanes = new List<Lane>();
        foreach (int slot in new[] { -2, -1, 1, 2 })
        {
            Func<double, double> y = x => BoundaryY(scene, slot, d, x);
            if (edit is not null)
            {
                y = edit(slot, y);
            }

            if (ProjectLane(y, slot) is Lane lane)
            {
                lanes.Add(lane);
            }
        }

        return new LaneRecord { Frame = Key(sequence, frame), Width = 1280, Height = 720, Tags = ["synthetic"], Lanes = lanes };
    }

    /// <summary>The frame key of frame i of a sequence.</summary>
    public static string Key(int sequence, int frame) =>
        string.Create(CultureInfo.InvariantCulture, $"seq{sequence:00}/{frame:000000}.png");

    /// <summary>Clean frames of several sequences, in order.</summary>
    public static IEnumerable<LaneRecord> Clean(ulong seed, int sequences, int framesPerSequence)
    {
        for (int s = 0; s < sequences; s++)
        {
            Scene scene = SceneFor(seed, s);
            for (int f = 0; f < framesPerSequence; f++)
            {
                yield return Frame(scene, s, f);
            }
        }
    }
}
