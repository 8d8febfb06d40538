using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics.Ground;

/// <summary>
/// Metric-space errors with a camera file: lanes are projected to the road plane (X forward, Y left, metres) and
/// compared where a lane-keeping engineer looks — lateral offset at look-ahead distances, ego-lane width, curvature.
/// </summary>
/// <remarks>
/// Pairs are the truth/prediction pairs that are true positives at IoU 0.50 (the Hungarian assignment of the IoU
/// metric). Lateral offset Y at distance X = d is interpolated linearly along the projected polyline (the first
/// segment that spans d); a lane that does not reach d has no value there. Ego-lane width is Y(slot −1) − Y(slot +1)
/// at 10 m, when both sides carry both slots. Curvature is that of the least-squares quadratic Y = aX² + bX + c over
/// the projected points with 3 m ≤ X ≤ 60 m (at least 4 points spanning 10 m), at X = 0:
/// κ = 2a / (1 + b²)^{3/2} (1/m).
/// </remarks>
public sealed class GroundErrors
{
    /// <summary>Default look-ahead distances in metres.</summary>
    public static IReadOnlyList<double> DefaultLookAheadM { get; } = [5, 10, 20, 30];

    /// <summary>Distance at which the ego-lane width is compared, metres.</summary>
    public const double EgoWidthAtM = 10;

    private readonly GroundProjection projection;
    private readonly double[] lookAhead;
    private readonly GroundLane ta = new();
    private readonly GroundLane pa = new();

    /// <summary>Creates the evaluator for a camera.</summary>
    public GroundErrors(CameraModel camera, IReadOnlyList<double>? lookAheadM = null)
    {
        ArgumentNullException.ThrowIfNull(camera);
        projection = camera.ToProjection();
        lookAhead = [.. lookAheadM ?? DefaultLookAheadM];
    }

    /// <summary>Look-ahead distances in metres.</summary>
    public IReadOnlyList<double> LookAheadM => lookAhead;

    /// <summary>Computes the frame's ground errors for the given true-positive pairs.</summary>
    public FrameGroundErrors Measure(IReadOnlyList<Lane> truth, IReadOnlyList<Lane> pred, IReadOnlyList<(int Truth, int Pred)> pairs)
    {
        ArgumentNullException.ThrowIfNull(truth);
        ArgumentNullException.ThrowIfNull(pred);
        ArgumentNullException.ThrowIfNull(pairs);
        var lateralSum = new double[lookAhead.Length];
        var lateralCount = new int[lookAhead.Length];
        double curvSum = 0;
        int curvCount = 0;
        foreach ((int ti, int pi) in pairs)
        {
            ta.Project(truth[ti].Points, projection);
            pa.Project(pred[pi].Points, projection);
            for (int k = 0; k < lookAhead.Length; k++)
            {
                if (ta.TryLateralAt(lookAhead[k], out double yt) && pa.TryLateralAt(lookAhead[k], out double yp))
                {
                    lateralSum[k] += Math.Abs(yp - yt);
                    lateralCount[k]++;
                }
            }

            if (ta.TryCurvature(out double kt) && pa.TryCurvature(out double kp))
            {
                curvSum += Math.Abs(kp - kt);
                curvCount++;
            }
        }

        double widthError = double.NaN;
        if (TryEgoWidth(truth, out double wt) && TryEgoWidth(pred, out double wp))
        {
            widthError = Math.Abs(wp - wt);
        }

        return new FrameGroundErrors(lateralSum, lateralCount, widthError, curvSum, curvCount);
    }

    private bool TryEgoWidth(IReadOnlyList<Lane> lanes, out double width)
    {
        width = double.NaN;
        Lane? left = null, right = null;
        foreach (Lane l in lanes)
        {
            if (l.Slot == -1)
            {
                left ??= l;
            }
            else if (l.Slot == 1)
            {
                right ??= l;
            }
        }

        if (left is null || right is null)
        {
            return false;
        }

        return GroundLane.TryWidthAt(ta.Project(left.Points, projection), pa.Project(right.Points, projection), EgoWidthAtM, out width);
    }
}
