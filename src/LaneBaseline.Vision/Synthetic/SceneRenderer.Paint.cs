using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Lane paint: every line's strips with their wear, drawn into the paint layer.</summary>
public sealed partial class SceneRenderer
{
    private void DrawPaint(in FrameContext ctx)
    {
        SceneSpec scene = ctx.Scene;
        whiteFine.SetTo(Scalar.All(0));
        double[] b = scene.BoundaryOffsetsM();
        bool anyYellow = false;
        for (int i = 0; i < b.Length; i++)
        {
            anyYellow |= IsYellow(scene, i);
        }

        if (anyYellow)
        {
            yellowFine.SetTo(Scalar.All(0));
        }

        double worn = Math.Max(scene.SeverityOf(KnownConditions.WornPaint), scene.SeverityOf(KnownConditions.HeavyWear));
        double sa = ctx.SV - 3, sb = ctx.SV + MaxRangeM;
        double half = scene.LineWidthM / 2;
        for (int i = 0; i < b.Length; i++)
        {
            Mat target = IsYellow(scene, i) ? yellowFine : whiteFine;
            switch (KindOf(scene, i))
            {
                case "dashed":
                    double period = scene.Standard.DashLengthM + scene.Standard.GapLengthM;
                    long k0 = (long)Math.Floor((sa - scene.DashPhaseM) / period);
                    for (long k = k0; ; k++)
                    {
                        double ds = scene.DashPhaseM + (k * period);
                        if (ds > sb)
                        {
                            break;
                        }

                        double d0 = Math.Max(ds, sa), d1 = Math.Min(ds + scene.Standard.DashLengthM, sb);
                        if (d1 > d0)
                        {
                            PaintStrip(ctx, target, i, d0, d1, b[i], half, worn);
                        }
                    }

                    break;
                case "double":
                    double off = (scene.Standard.DoubleLineGapM / 2) + half;
                    PaintStrip(ctx, target, i, sa, sb, b[i] + off, half, worn);
                    PaintStrip(ctx, target, i + 1000, sa, sb, b[i] - off, half, worn);
                    break;
                default:
                    PaintStrip(ctx, target, i, sa, sb, b[i], half, worn);
                    break;
            }
        }

        whiteCoverage.SetTo(Scalar.All(0));
        yellowCoverage.SetTo(Scalar.All(0));
        var rows = new Rect(0, PaintTop, width, PaintRows);
        using (var whiteRows = new Mat(whiteCoverage, rows))
        {
            Cv2.Resize(whiteFine, whiteRows, new Size(width, PaintRows), 0, 0, InterpolationFlags.Area);
        }

        if (anyYellow)
        {
            using var yellowRows = new Mat(yellowCoverage, rows);
            Cv2.Resize(yellowFine, yellowRows, new Size(width, PaintRows), 0, 0, InterpolationFlags.Area);
        }
    }

    private void PaintStrip(in FrameContext ctx, Mat target, int lineId, double s0, double s1, double lateral, double half, double worn)
    {
        if (worn <= 0)
        {
            FillPaintStrip(ctx, target, s0, s1, lateral, half, Scalar.All(255));
            return;
        }

        // Worn paint: 0.5 m pieces, each with its own remaining coverage, fixed to the road (stable in sequences).
        long first = (long)Math.Floor(s0 / PaintPieceM), last = (long)Math.Floor(s1 / PaintPieceM);
        for (long j = first; j <= last; j++)
        {
            double a = Math.Max(s0, j * PaintPieceM), c = Math.Min(s1, (j + 1) * PaintPieceM);
            if (c <= a)
            {
                continue;
            }

            SplitMix64 rng = BinStream(ctx.Scene, 50 + lineId, j);
            double u1 = rng.NextDouble(), u2 = rng.NextDouble();
            double alpha = u2 < 0.45 * worn ? 0 : 1 - (worn * (0.3 + (0.6 * Math.Pow(u1, 0.7))));
            if (alpha <= 0.02)
            {
                continue;
            }

            FillPaintStrip(ctx, target, a, c, lateral, half, Scalar.All(255 * alpha));
        }
    }
}
