using System.Globalization;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// The temporal rules (<c>LBA-T01</c> … <c>LBA-T03</c>) over frames in file order. A frame key ending in a number
/// (<c>seq/000123.png</c>, <c>clip.mp4#000123</c>) belongs to the sequence named by everything before the number;
/// frames of one sequence are consecutive when their numbers differ by one. Lanes of two frames are matched by a
/// Hungarian assignment on the lateral distance at their nearest common row where the lane width can be measured
/// (two lanes of a frame on that row), gated at 0.75 (jumps) or 0.5 (flicker) of that width in pixels. Slots are not used for matching: they are renumbered when the vehicle
/// changes lanes. Not thread-safe; feed frames in order.
/// </summary>
public sealed partial class TemporalRules
{
    private readonly AuditSettings settings;
    private Frame? older;
    private Frame? previous;

    /// <summary>Creates the rule state.</summary>
    public TemporalRules(AuditSettings settings)
    {
        this.settings = settings;
    }

    /// <summary>Takes the next frame; findings for it (and for the frame before it, for flicker) go to the sink.</summary>
    public void Push(LaneRecord record, long ordinal, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(record);
        ArgumentNullException.ThrowIfNull(sink);
        var cur = new Frame(record, ordinal, SequenceKey.Parse(record.Frame));
        if (previous is not null && cur.Sequence is { } s && previous.Sequence is { } p && s.Name == p.Name && s.Number > p.Number)
        {
            long step = s.Number - p.Number;
            if (step > 1)
            {
                sink.Add(new AuditFinding(record.Frame, ordinal, AuditRules.FrameGap, AuditRules.Get(AuditRules.FrameGap).Severity, null, null, step - 1, 0, "frames",
                    Inv($"{step - 1} frame(s) missing before this one in sequence '{s.Name}'")));
            }

            CheckJumps(previous, cur, step / settings.FramesPerSecond, sink);
            if (step == 1 && older is not null && older.Sequence is { } o && o.Name == s.Name && p.Number - o.Number == 1)
            {
                CheckFlicker(older, previous, cur, sink);
            }
        }
        else
        {
            older = null;
        }

        older = previous;
        previous = cur;
    }

    private void CheckJumps(Frame a, Frame b, double dt, List<AuditFinding> sink)
    {
        foreach ((int i, int j, double dxPx, double row) in Match(a.Record.Lanes, b.Record.Lanes, 0.75))
        {
            double w = LaneSampling.LaneWidthPxAt(b.Record.Lanes, row) ?? LaneSampling.LaneWidthPxAt(a.Record.Lanes, row) ?? double.NaN;
            if (double.IsNaN(w))
            {
                continue;
            }

            double metres = Math.Abs(dxPx) * settings.AssumedLaneWidthM / w;
            double limit = (settings.MaxLateralSpeedMps * dt) + settings.LateralNoiseM;
            if (metres > limit)
            {
                sink.Add(new AuditFinding(b.Record.Frame, b.Ordinal, AuditRules.LateralJump, AuditRules.Get(AuditRules.LateralJump).Severity, j, null, metres, limit, "m",
                    Inv($"lane {j} moved {metres:0.##} m sideways at row {row:0} since '{a.Record.Frame}' (lane {i}; {dxPx:0.#} px, lane width {w:0.#} px = {settings.AssumedLaneWidthM} m assumed)")));
            }
        }
    }

    private static void CheckFlicker(Frame a, Frame b, Frame c, List<AuditFinding> sink)
    {
        string rule = AuditRules.Flicker;
        AuditSeverity severity = AuditRules.Get(rule).Severity;
        var ab = Match(a.Record.Lanes, b.Record.Lanes, 0.5);
        var bc = Match(b.Record.Lanes, c.Record.Lanes, 0.5);
        foreach ((int i, int k, _, double row) in Match(a.Record.Lanes, c.Record.Lanes, 0.5))
        {
            if (!ab.Any(m => m.I == i) && !bc.Any(m => m.J == k))
            {
                sink.Add(new AuditFinding(b.Record.Frame, b.Ordinal, rule, severity, null, null, 1, 0, "frames",
                    Inv($"lane {i} of '{a.Record.Frame}' (slot {Slot(a.Record.Lanes[i])}) is missing here but back in '{c.Record.Frame}' (lane {k})")));
            }
        }

        for (int j = 0; j < b.Record.Lanes.Count; j++)
        {
            if (!ab.Any(m => m.J == j) && !bc.Any(m => m.I == j) && a.Record.Lanes.Count > 0 && c.Record.Lanes.Count > 0)
            {
                sink.Add(new AuditFinding(b.Record.Frame, b.Ordinal, rule, severity, j, null, 1, 0, "frames",
                    Inv($"lane {j} appears in this frame only (not in '{a.Record.Frame}' nor '{c.Record.Frame}')")));
            }
        }
    }

    private static string Slot(Lane lane) => lane.Slot?.ToString(CultureInfo.InvariantCulture) ?? "none";

    /// <summary>Matches lanes of two frames: (index in a, index in b, x_b - x_a at the row, row).</summary>
    private static List<(int I, int J, double Dx, double Row)> Match(IReadOnlyList<Lane> a, IReadOnlyList<Lane> b, double gateLaneWidths)
    {
        var result = new List<(int, int, double, double)>();
        if (a.Count == 0 || b.Count == 0)
        {
            return result;
        }

        // For each pair: the nearest common row where the lane width can be measured (two lanes of either frame).
        var dx = new double[a.Count * b.Count];
        var rows = new double[a.Count * b.Count];
        var widths = new double[a.Count * b.Count];
        var ok = new bool[a.Count * b.Count];
        for (int i = 0; i < a.Count; i++)
        {
            for (int j = 0; j < b.Count; j++)
            {
                (double lo, double hi) = LaneSampling.Common(a[i], b[j], double.NegativeInfinity);
                for (double row = Math.Floor(hi); row >= lo; row -= 5)
                {
                    double? w = LaneSampling.LaneWidthPxAt(b, row) ?? LaneSampling.LaneWidthPxAt(a, row);
                    if (w is double ww && LaneSampling.XAt(a[i], row, out double xa) && LaneSampling.XAt(b[j], row, out double xb))
                    {
                        int k = (i * b.Count) + j;
                        dx[k] = xb - xa;
                        rows[k] = row;
                        widths[k] = ww;
                        ok[k] = true;
                        break;
                    }
                }
            }
        }

        const double Far = 1e9;
        var cost = new double[a.Count * b.Count];
        var gate = new double[a.Count * b.Count];
        for (int k = 0; k < cost.Length; k++)
        {
            gate[k] = ok[k] ? gateLaneWidths * widths[k] : 0;
            cost[k] = ok[k] && Math.Abs(dx[k]) < gate[k] ? Math.Abs(dx[k]) : Far;
        }

        int[] assign = Hungarian.Minimize(cost, a.Count, b.Count);
        for (int i = 0; i < a.Count; i++)
        {
            int j = assign[i];
            if (j >= 0 && cost[(i * b.Count) + j] < Far)
            {
                result.Add((i, j, dx[(i * b.Count) + j], rows[(i * b.Count) + j]));
            }
        }

        return result;
    }

    /// <summary>
    /// Forgets the frames seen so far, as if a frame of another sequence came next: a sharded audit calls it for every
    /// frame of another shard, so the findings on the frames it keeps equal those of an unsharded run.
    /// </summary>
    public void Break()
    {
        older = null;
        previous = null;
    }

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);

    private sealed record Frame(LaneRecord Record, long Ordinal, (string Name, long Number)? Sequence);
}
