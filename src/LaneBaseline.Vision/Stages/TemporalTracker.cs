using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Kalman filtering of each slot's curve coefficients over a sequence, driven by frame timestamps; seeds the next
/// frame's search around the previous fits; resets on a lane change. Only built when tracking is on.
/// </summary>
/// <remarks>
/// Model (bird's-eye pixels, x = A·y² + B·y + C, y down): each coefficient of each slot (−3 … +3) is a
/// random walk, filtered independently: predict P ← P + q²·Δt with q = <see cref="TrackingOptions.OffsetNoisePxPerSqrtS"/>
/// for C (divided by the bird's-eye height H for B and by H² for A), Δt from the frame timestamps; update with
/// measurement variance r² (r = <see cref="TrackingOptions.MeasurementNoisePx"/>, scaled the same way), gain K = P / (P + r²),
/// state ← state + K·(z − state), P ← (1 − K)·P. A slot without a measurement coasts on its prediction for up to
/// <see cref="TrackingOptions.MaxMissedFrames"/> frames with its score halved each frame. When an ego boundary's
/// bottom position jumps by more than half the ego-lane width (the vehicle changed lanes and the slots shifted),
/// when time runs backwards or pauses over 1 s, every track is reset. The filtered curves replace the measured ones
/// and are sampled back to the image; the predicted bottom positions seed the next frame's sliding-window search.
/// <para>References: [1] R. E. Kalman, "A New Approach to Linear Filtering and Prediction Problems", Journal of Basic
/// Engineering 82(1):35–45, 1960, DOI 10.1115/1.3662552.</para>
/// </remarks>
public sealed class TemporalTracker : IFrameStage
{
    private static readonly int[] Slots = [-3, -2, -1, 1, 2, 3];
    private readonly TrackingOptions options;
    private readonly FitOptions fit;
    private readonly double[] state = new double[3 * 6];
    private readonly double[] variance = new double[3 * 6];
    private readonly int[] missed = new int[6];
    private readonly bool[] active = new bool[6];
    private readonly double[] score = new double[6];
    private readonly LaneEstimate[] scratch = new LaneEstimate[FrameWorkspace.MaxLanes];
    private readonly int[] candidate = new int[6];
    private readonly int[] candidateScratch = new int[FrameWorkspace.MaxLanes];
    private double lastTime = double.NaN;

    /// <summary>Creates the tracker.</summary>
    public TemporalTracker(TrackingOptions options, FitOptions fit)
    {
        this.options = options;
        this.fit = fit;
    }

    /// <inheritdoc />
    public string Name => "track";

    /// <summary>Number of slots currently tracked (for tests).</summary>
    public int ActiveTracks => active.Count(a => a);

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        FrameWorkspace ws = workspace;
        double h = ws.Warp.BirdsEyeHeight, yb = h - 1;
        double dt = double.IsNaN(lastTime) ? 0 : ws.TimestampSeconds - lastTime;
        if (dt < 0 || dt > 1)
        {
            Reset();
            dt = 0;
        }

        lastTime = ws.TimestampSeconds;
        ws.Track.PriorSeedCount = 0;
        if (LaneChanged(ws, yb))
        {
            Reset();
        }

        double q2 = options.OffsetNoisePxPerSqrtS * options.OffsetNoisePxPerSqrtS * dt;
        double r2 = options.MeasurementNoisePx * options.MeasurementNoisePx;
        Span<double> scale = [1 / (h * h), 1 / h, 1];
        Span<bool> measured = stackalloc bool[6];
        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate lane = ws.Lanes[i];
            int t = Array.IndexOf(Slots, lane.Slot);
            measured[t] = true;
            candidate[t] = ws.LaneCandidate[i];
            Span<double> z = [lane.Fit.A, lane.Fit.B, lane.Fit.C];
            if (!active[t])
            {
                for (int k = 0; k < 3; k++)
                {
                    state[(3 * t) + k] = z[k];
                    variance[(3 * t) + k] = r2 * scale[k] * scale[k];
                }

                active[t] = true;
            }
            else
            {
                for (int k = 0; k < 3; k++)
                {
                    int j = (3 * t) + k;
                    double s2 = scale[k] * scale[k];
                    double p = variance[j] + (q2 * s2);
                    double gain = p / (p + (r2 * s2));
                    state[j] += gain * (z[k] - state[j]);
                    variance[j] = (1 - gain) * p;
                }
            }

            missed[t] = 0;
            score[t] = lane.Score;
        }

        // Rebuild the lane list in slot order from the filtered (or coasting) tracks.
        int count = 0;
        for (int t = 0; t < Slots.Length; t++)
        {
            if (!active[t])
            {
                continue;
            }

            if (!measured[t])
            {
                for (int k = 0; k < 3; k++)
                {
                    variance[(3 * t) + k] += q2 * scale[k] * scale[k];
                }

                missed[t]++;
                score[t] *= 0.5;
                if (missed[t] > options.MaxMissedFrames)
                {
                    active[t] = false;
                    continue;
                }
            }

            var curve = new Quadratic(state[3 * t], state[(3 * t) + 1], state[(3 * t) + 2]);
            int points = LaneSampler.Sample(ws, fit, curve, 0, ws.LanePoints[count]);
            if (points < 2)
            {
                continue;
            }

            scratch[count] = new LaneEstimate(Slots[t], Math.Clamp(score[t], 0, 1), curve, 0, 0, 0, points);
            candidateScratch[count] = measured[t] ? candidate[t] : -1;
            count++;
        }

        Array.Copy(scratch, ws.Lanes, count);
        Array.Copy(candidateScratch, ws.LaneCandidate, count);
        ws.LaneCount = count;

        // Seeds for the next frame: the tracks' bottom positions.
        int seeds = 0;
        for (int t = 0; t < Slots.Length; t++)
        {
            if (active[t])
            {
                ws.Track.PriorSeedX[seeds++] = new Quadratic(state[3 * t], state[(3 * t) + 1], state[(3 * t) + 2]).At(yb);
            }
        }

        ws.Track.PriorSeedCount = seeds;
    }

    private bool LaneChanged(FrameWorkspace ws, double yb)
    {
        int left = Array.IndexOf(Slots, -1), right = Array.IndexOf(Slots, 1);
        if (!active[left] || !active[right])
        {
            return false;
        }

        double xl = new Quadratic(state[3 * left], state[(3 * left) + 1], state[(3 * left) + 2]).At(yb);
        double xr = new Quadratic(state[3 * right], state[(3 * right) + 1], state[(3 * right) + 2]).At(yb);
        double half = Math.Abs(xr - xl) / 2;
        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate lane = ws.Lanes[i];
            if (Math.Abs(lane.Slot) == 1 && Math.Abs(lane.Fit.At(yb) - (lane.Slot < 0 ? xl : xr)) > half)
            {
                return true;
            }
        }

        return false;
    }

    /// <summary>Forgets every track (a new sequence starts).</summary>
    public void Reset()
    {
        Array.Clear(active);
        Array.Clear(missed);
        lastTime = double.NaN;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
