using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Paint strips drawn with the anti-aliasing bias of <c>Cv2.FillPoly</c> taken out.</summary>
public sealed partial class SceneRenderer
{
    /// <summary>
    /// <c>Cv2.FillPoly</c> with <c>LineTypes.AntiAlias</c> covers about 0.7 px more than the exact polygon on every
    /// side (measured on OpenCV 4.13: a 10 x 80 px rectangle covers 11.4 x 81.3 px), so paint strips are drawn on a
    /// supersampled mask (<see cref="paintScale"/> times the frame size), shrunk by this many sub-pixels before
    /// filling, and area-averaged down; painted widths and dash lengths then stay true on the ground even for
    /// lines seen at a grazing angle.
    /// </summary>
    internal const double FillBiasPx = 0.7;

    private readonly List<(double U, double V)> leftSide = new(512);
    private readonly List<(double U, double V)> rightSide = new(512);

    /// <summary>Fills a paint strip along the road (lateral centre and half-width, metres, arc lengths s0..s1).</summary>
    private void FillPaintStrip(in FrameContext ctx, Mat target, double s0, double s1, double lateralM, double halfWidthM, Scalar colour)
    {
        leftSide.Clear();
        rightSide.Clear();
        double s = s0;
        while (true)
        {
            (double lx, double ly) = ToVehicle(ctx, s, lateralM + halfWidthM);
            (double rx, double ry) = ToVehicle(ctx, s, lateralM - halfWidthM);
            if (lx >= NearClipM && rx >= NearClipM &&
                projection.TryProjectGround(lx, ly, out double lu, out double lv) &&
                projection.TryProjectGround(rx, ry, out double ru, out double rv))
            {
                // Sub-pixel coordinates of the supersampled mask: pixel centre u maps to K·u + (K − 1) / 2.
                // The fine masks start at row PaintTop.
                double k = paintScale, o = (paintScale - 1) / 2.0, top = PaintTop;
                leftSide.Add(((k * lu) + o, (k * (lv - top)) + o));
                rightSide.Add(((k * ru) + o, (k * (rv - top)) + o));
            }

            if (s >= s1)
            {
                break;
            }

            s = Math.Min(s1, s + Math.Min(0.5, StepAt(s - ctx.SV)));
        }

        int n = leftSide.Count;
        if (n < 2)
        {
            return;
        }

        // Across the strip: move each side inward so that its edge moves FillBiasPx along its own normal.
        for (int i = 0; i < n; i++)
        {
            (double U, double V) l = leftSide[i], r = rightSide[i];
            double eu = r.U - l.U, ev = r.V - l.V, w = Math.Sqrt((eu * eu) + (ev * ev));
            if (w < 1e-9)
            {
                continue;
            }

            eu /= w;
            ev /= w;
            double tl = Math.Min(FillBiasPx / Math.Max(NormalComponent(leftSide, i, eu, ev), 0.2), 0.35 * w);
            double tr = Math.Min(FillBiasPx / Math.Max(NormalComponent(rightSide, i, eu, ev), 0.2), 0.35 * w);
            leftSide[i] = (l.U + (eu * tl), l.V + (ev * tl));
            rightSide[i] = (r.U - (eu * tr), r.V - (ev * tr));
        }

        // Along the strip: pull both ends in by the same bias.
        double length = 0;
        for (int i = 1; i < n; i++)
        {
            length += Distance(Mid(i - 1), Mid(i));
        }

        double pull = Math.Min(FillBiasPx, 0.3 * length);
        PullEnd(0, 1, pull);
        PullEnd(n - 1, n - 2, pull);

        imagePoly.Clear();
        for (int i = 0; i < n; i++)
        {
            imagePoly.Add(new Point(ToFixed(leftSide[i].U), ToFixed(leftSide[i].V)));
        }

        for (int i = n - 1; i >= 0; i--)
        {
            imagePoly.Add(new Point(ToFixed(rightSide[i].U), ToFixed(rightSide[i].V)));
        }

        FillImagePolygon(target, colour);
    }

    private (double U, double V) Mid(int i) => ((leftSide[i].U + rightSide[i].U) / 2, (leftSide[i].V + rightSide[i].V) / 2);

    private static double Distance((double U, double V) a, (double U, double V) b) =>
        Math.Sqrt(((a.U - b.U) * (a.U - b.U)) + ((a.V - b.V) * (a.V - b.V)));

    /// <summary>|e · n| where n is the unit normal of the side's edge at point i.</summary>
    private static double NormalComponent(List<(double U, double V)> side, int i, double eu, double ev)
    {
        (double U, double V) a = side[Math.Max(0, i - 1)], b = side[Math.Min(side.Count - 1, i + 1)];
        double du = b.U - a.U, dv = b.V - a.V, len = Math.Sqrt((du * du) + (dv * dv));
        if (len < 1e-9)
        {
            return 1;
        }

        return Math.Abs(((-dv / len) * eu) + ((du / len) * ev));
    }

    private void PullEnd(int end, int next, double pull)
    {
        foreach (List<(double U, double V)> side in new[] { leftSide, rightSide })
        {
            (double U, double V) a = side[end], b = side[next];
            double d = Distance(a, b);
            if (d < 1e-9)
            {
                continue;
            }

            double t = Math.Min(pull, 0.45 * d) / d;
            side[end] = (a.U + ((b.U - a.U) * t), a.V + ((b.V - a.V) * t));
        }
    }
}
