using System.Globalization;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Vision.Synthetic;

// The exact truth of a rendered frame: lane boundaries clipped to the image and resampled, marking kinds and colours, frame tags.
public sealed partial class SceneRenderer
{
    private List<Lane> BuildTruth(in FrameContext ctx, double egoLateral)
    {
        SceneSpec scene = ctx.Scene;
        double[] b = scene.BoundaryOffsetsM();
        int ego = EgoLane(b, egoLateral);
        var lanes = new List<Lane>(b.Length);
        for (int i = 0; i < b.Length; i++)
        {
            dense.Clear();
            for (double s = ctx.SV - 2; s <= ctx.SV + MaxRangeM; s += 0.25)
            {
                (double wx, double wy) = ctx.Road.Offset(s, b[i]);
                (double x, double y) = ctx.Pose.ToVehicle(wx, wy);
                if (x < NearClipM || x > MaxRangeM)
                {
                    continue;
                }

                if (projection.TryProjectGround(x, y, out double u, out double v))
                {
                    dense.Add((u, v));
                }
            }

            List<LanePoint>? points = ClipAndResample();
            if (points is null)
            {
                continue;
            }

            int slot = i <= ego ? -(ego - i + 1) : i - ego;
            lanes.Add(new Lane { Points = points, Slot = slot, Kind = KindOf(scene, i) });
        }

        // Lanes are listed left to right across the road.
        return lanes;
    }

    private static int EgoLane(double[] b, double lateral)
    {
        for (int i = 0; i < b.Length - 1; i++)
        {
            if (lateral <= b[i] && lateral > b[i + 1])
            {
                return i;
            }
        }

        return lateral > b[0] ? 0 : b.Length - 2;
    }

    internal static string KindOf(SceneSpec scene, int boundary)
    {
        int last = scene.LaneWidthsM.Count;
        if (boundary == scene.OpposingBoundary)
        {
            return LaneKinds.DoubleLine;
        }

        return boundary == 0 || boundary == last ? LaneKinds.Solid : LaneKinds.Dashed;
    }

    /// <summary>Colour of a boundary's paint: true for yellow.</summary>
    internal static bool IsYellow(SceneSpec scene, int boundary)
    {
        if (boundary == scene.OpposingBoundary)
        {
            return scene.Standard.YellowLeftEdge;
        }

        return boundary == 0 && scene.OpposingBoundary < 0 && scene.Standard.YellowLeftEdge;
    }

    /// <summary>Clips <see cref="dense"/> to the image and resamples it every ~<see cref="TruthSpacingPx"/> pixels.</summary>
    private List<LanePoint>? ClipAndResample()
    {
        run.Clear();
        double maxU = width - 1, maxV = height - 1;
        for (int k = 1; k < dense.Count; k++)
        {
            (double U, double V) p = dense[k - 1], q = dense[k];
            if (run.Count > 0 && q.V >= run[^1].V - 1e-9)
            {
                break; // the line no longer rises in the image (hidden or turning back): stop.
            }

            if (!ClipSegment(p, q, maxU, maxV, out (double U, double V) a, out (double U, double V) c))
            {
                if (run.Count > 0)
                {
                    break;
                }

                continue;
            }

            if (run.Count == 0)
            {
                run.Add(a);
            }

            if (c.V < run[^1].V - 1e-9)
            {
                run.Add(c);
            }

            if (c != q)
            {
                break; // left the frame
            }
        }

        if (run.Count < 2)
        {
            return null;
        }

        var result = new List<LanePoint>(64) { new(Round(run[0].U), Round(run[0].V)) };
        double carry = 0;
        for (int k = 1; k < run.Count; k++)
        {
            (double U, double V) p = run[k - 1], q = run[k];
            double len = Math.Sqrt(((q.U - p.U) * (q.U - p.U)) + ((q.V - p.V) * (q.V - p.V)));
            double pos = TruthSpacingPx - carry;
            while (pos < len)
            {
                double f = pos / len;
                AddMonotonic(result, p.U + ((q.U - p.U) * f), p.V + ((q.V - p.V) * f));
                pos += TruthSpacingPx;
            }

            carry = len - (pos - TruthSpacingPx);
        }

        AddMonotonic(result, run[^1].U, run[^1].V);
        return result.Count >= 2 ? result : null;
    }

    private static void AddMonotonic(List<LanePoint> list, double u, double v)
    {
        double ru = Round(u), rv = Round(v);
        if (rv < list[^1].Y)
        {
            list.Add(new LanePoint(ru, rv));
        }
    }

    private static double Round(double x) => Math.Round(x, 2);

    /// <summary>Liang–Barsky clip of segment p→q to [0, maxU] × [0, maxV].</summary>
    private static bool ClipSegment((double U, double V) p, (double U, double V) q, double maxU, double maxV, out (double U, double V) a, out (double U, double V) c)
    {
        double t0 = 0, t1 = 1, du = q.U - p.U, dv = q.V - p.V;
        a = p;
        c = q;
        if (!Clip(-du, p.U, ref t0, ref t1) || !Clip(du, maxU - p.U, ref t0, ref t1) ||
            !Clip(-dv, p.V, ref t0, ref t1) || !Clip(dv, maxV - p.V, ref t0, ref t1))
        {
            return false;
        }

        if (t0 > 0)
        {
            a = (p.U + (t0 * du), p.V + (t0 * dv));
        }

        if (t1 < 1)
        {
            c = (p.U + (t1 * du), p.V + (t1 * dv));
        }

        return true;
    }

    private static bool Clip(double pp, double qq, ref double t0, ref double t1)
    {
        if (pp == 0)
        {
            return qq >= 0;
        }

        double r = qq / pp;
        if (pp < 0)
        {
            if (r > t1)
            {
                return false;
            }

            t0 = Math.Max(t0, r);
        }
        else
        {
            if (r < t0)
            {
                return false;
            }

            t1 = Math.Min(t1, r);
        }

        return true;
    }

    private static List<string> BuildTags(in FrameContext ctx)
    {
        SceneSpec scene = ctx.Scene;
        var tags = new List<string>();
        bool any = false;
        foreach (RenderCondition c in scene.Conditions)
        {
            if (c.Severity > 0)
            {
                tags.Add(c.Name);
                any = true;
            }
        }

        if (!any)
        {
            tags.Add("clean");
        }

        double maxCurv = 0;
        for (double s = ctx.SV; s <= ctx.SV + 80; s += 5)
        {
            maxCurv = Math.Max(maxCurv, Math.Abs(ctx.Road.CurvatureAt(s)));
        }

        // Radius below 2000 m within the first 80 m counts as a curve (common practice for "gentle" vs straight).
        tags.Add(maxCurv > 1.0 / 2000 ? "curve" : "straight");
        tags.Add(scene.Concrete ? "concrete" : "asphalt");
        tags.Add("markings-" + scene.Standard.Name);
        tags.Add("lanes-" + scene.LaneWidthsM.Count.ToString(CultureInfo.InvariantCulture));
        if (scene.OpposingBoundary >= 0)
        {
            tags.Add("two-way");
        }

        if (scene.LaneChangeDirection != 0)
        {
            double u = (ctx.TimeS - scene.LaneChangeStartS) / scene.LaneChangeDurationS;
            if (u > 0 && u < 1)
            {
                tags.Add("lane-change");
            }
        }

        return tags;
    }
}
