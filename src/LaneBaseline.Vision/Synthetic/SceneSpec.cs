using LaneBaseline.Core.Random;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>
/// Everything that defines one rendered scene (a still or a sequence): road geometry, lanes and markings, the
/// ego vehicle's motion and the appearance conditions. Created from a seed by <see cref="Create"/>; the same
/// seed and index always give the same scene, and severities do not change the layout, only its strength.
/// </summary>
/// <remarks>
/// World plane: x, y in metres, the road centreline starts at the origin heading along +x. Lateral offsets are
/// measured from the centreline, positive to the left of the direction of travel.
/// </remarks>
public sealed record SceneSpec
{
    /// <summary>Seed of the scene's own random streams.</summary>
    public required ulong SceneSeed { get; init; }

    /// <summary>Marking convention.</summary>
    public required MarkingStandard Standard { get; init; }

    /// <summary>Road centreline pieces.</summary>
    public required IReadOnlyList<RoadPiece> Pieces { get; init; }

    /// <summary>Lane widths from the leftmost lane to the rightmost, metres.</summary>
    public required IReadOnlyList<double> LaneWidthsM { get; init; }

    /// <summary>Width of every painted line, metres.</summary>
    public required double LineWidthM { get; init; }

    /// <summary>Index of the boundary that separates opposing traffic (drawn as a double line), or -1 for a one-way road.</summary>
    public int OpposingBoundary { get; init; } = -1;

    /// <summary>Paved shoulder beyond each edge line, metres.</summary>
    public double ShoulderM { get; init; } = 1.0;

    /// <summary>Whether the surface is concrete (else asphalt).</summary>
    public bool Concrete { get; init; }

    /// <summary>Distance of the first dash start from the centreline origin, metres (dash phase).</summary>
    public double DashPhaseM { get; init; }

    /// <summary>Arc length of the ego vehicle at frame 0, metres.</summary>
    public required double StartSM { get; init; }

    /// <summary>Ego speed, metres per second.</summary>
    public required double SpeedMps { get; init; }

    /// <summary>Frames per second of a sequence.</summary>
    public double FramesPerSecond { get; init; } = 10;

    /// <summary>Lane (0 = leftmost) the ego vehicle starts in.</summary>
    public required int StartLane { get; init; }

    /// <summary>Offset of the camera from its lane centre, metres (positive left).</summary>
    public double LaneOffsetM { get; init; }

    /// <summary>Lane change: direction −1 (to the right), +1 (to the left) or 0 (none).</summary>
    public int LaneChangeDirection { get; init; }

    /// <summary>Lane change start time, seconds from frame 0.</summary>
    public double LaneChangeStartS { get; init; }

    /// <summary>Lane change duration, seconds.</summary>
    public double LaneChangeDurationS { get; init; } = 4;

    /// <summary>Appearance conditions with their severities.</summary>
    public IReadOnlyList<RenderCondition> Conditions { get; init; } = [];

    /// <summary>Severity of a condition, 0 when absent.</summary>
    public double SeverityOf(string condition)
    {
        foreach (RenderCondition c in Conditions)
        {
            if (string.Equals(c.Name, condition, StringComparison.Ordinal))
            {
                return c.Severity;
            }
        }

        return 0;
    }

    /// <summary>Lateral offsets of the lane boundaries from the centreline, left to right (count = lanes + 1).</summary>
    public double[] BoundaryOffsetsM()
    {
        double total = LaneWidthsM.Sum();
        var b = new double[LaneWidthsM.Count + 1];
        b[0] = total / 2;
        for (int i = 0; i < LaneWidthsM.Count; i++)
        {
            b[i + 1] = b[i] - LaneWidthsM[i];
        }

        return b;
    }

    /// <summary>Time of a frame in seconds.</summary>
    public double TimeOf(int frameIndex) => frameIndex / FramesPerSecond;

    /// <summary>Ego arc length and lateral offset (metres) and its heading relative to the road (radians) at a time.</summary>
    public (double SM, double LateralM, double RelativeHeading) EgoPose(double timeS)
    {
        double[] b = BoundaryOffsetsM();
        double centre = (b[StartLane] + b[StartLane + 1]) / 2;
        double lateral = centre + LaneOffsetM;
        double rate = 0;
        if (LaneChangeDirection != 0)
        {
            int target = StartLane - LaneChangeDirection;
            double targetCentre = (b[target] + b[target + 1]) / 2;
            double delta = targetCentre - centre;
            double u = Math.Clamp((timeS - LaneChangeStartS) / LaneChangeDurationS, 0, 1);
            // Cosine profile: smooth lateral speed, zero at both ends.
            lateral += delta * (1 - Math.Cos(Math.PI * u)) / 2;
            if (u > 0 && u < 1)
            {
                rate = delta * Math.PI * Math.Sin(Math.PI * u) / (2 * LaneChangeDurationS);
            }
        }

        return (StartSM + (SpeedMps * timeS), lateral, Math.Atan2(rate, SpeedMps));
    }

    /// <summary>
    /// Builds a random scene. <paramref name="conditions"/> fixes the appearance; everything else (road, lanes,
    /// markings, motion) comes from <paramref name="seed"/> and <paramref name="sceneIndex"/> alone.
    /// </summary>
    public static SceneSpec Create(ulong seed, int sceneIndex, IReadOnlyList<RenderCondition> conditions, int sequenceLength, double framesPerSecond)
    {
        ArgumentNullException.ThrowIfNull(conditions);
        SplitMix64 rng = SplitMix64.ForStream(seed, (ulong)sceneIndex);
        ulong sceneSeed = rng.NextUInt64();
        MarkingStandard standard = KnownMarkingStandards.All[rng.NextInt(KnownMarkingStandards.All.Count)];
        int lanes = 2 + rng.NextInt(4);
        double baseWidth = rng.NextDouble(standard.MinLaneWidthM, standard.MaxLaneWidthM);
        var widths = new double[lanes];
        for (int i = 0; i < lanes; i++)
        {
            widths[i] = Math.Clamp(baseWidth + rng.NextDouble(-0.05, 0.05), standard.MinLaneWidthM, standard.MaxLaneWidthM);
        }

        double lineWidth = rng.NextDouble(standard.MinLineWidthM, standard.MaxLineWidthM);
        int opposing = lanes >= 2 && rng.NextDouble() < 0.25 ? lanes / 2 : -1;
        int firstOwnLane = opposing < 0 ? 0 : opposing;
        int startLane = firstOwnLane + rng.NextInt(lanes - firstOwnLane);
        double speed = rng.NextDouble(18, 33);
        double duration = sequenceLength / framesPerSecond;
        int changeDir = 0;
        double changeStart = 0, changeDuration = rng.NextDouble(3, 5);
        if (sequenceLength > 1 && rng.NextDouble() < 0.6)
        {
            bool canLeft = startLane > firstOwnLane, canRight = startLane < lanes - 1;
            if (canLeft || canRight)
            {
                changeDir = canLeft && (!canRight || rng.NextDouble() < 0.5) ? 1 : -1;
                changeStart = rng.NextDouble(0, Math.Max(0.1, duration - (changeDuration / 2)));
            }
        }

        double startS = rng.NextDouble(30, 250);
        double needed = startS + (speed * duration) + 1700;
        var pieces = new List<RoadPiece> { RoadPiece.Straight(rng.NextDouble(20, 120)) };
        double length = pieces[0].LengthM;
        while (length < needed)
        {
            double choice = rng.NextDouble();
            if (choice < 0.35)
            {
                pieces.Add(RoadPiece.Straight(rng.NextDouble(60, 300)));
            }
            else
            {
                // Clothoid entry, circular arc, clothoid exit. Radii 250-1500 m and clothoid parameters
                // 90-300 m lie in the range of German RAA 2008 (minimum radii 280-900 m, A >= 90-300 m).
                double radius = rng.NextDouble(250, 1500) * (rng.NextDouble() < 0.5 ? -1 : 1);
                double a = rng.NextDouble(90, 300);
                pieces.Add(RoadPiece.Clothoid(a, 0, 1 / radius));
                pieces.Add(RoadPiece.Arc(rng.NextDouble(40, 250), radius));
                pieces.Add(RoadPiece.Clothoid(a, 1 / radius, 0));
            }

            length = pieces.Sum(p => p.LengthM);
        }

        return new SceneSpec
        {
            SceneSeed = sceneSeed,
            Standard = standard,
            Pieces = pieces,
            LaneWidthsM = widths,
            LineWidthM = lineWidth,
            OpposingBoundary = opposing,
            ShoulderM = rng.NextDouble(0.4, 2.5),
            Concrete = rng.NextDouble() < 0.25,
            DashPhaseM = rng.NextDouble(0, standard.DashLengthM + standard.GapLengthM),
            StartSM = startS,
            SpeedMps = speed,
            FramesPerSecond = framesPerSecond,
            StartLane = startLane,
            LaneOffsetM = rng.NextDouble(-0.3, 0.3),
            LaneChangeDirection = changeDir,
            LaneChangeStartS = changeStart,
            LaneChangeDurationS = changeDuration,
            Conditions = conditions,
        };
    }
}
