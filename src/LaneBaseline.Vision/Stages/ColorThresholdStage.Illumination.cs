using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>Illumination: grey-world gains, CLAHE in low light, the road sample's row span and percentiles.</summary>
public sealed partial class ColorThresholdStage
{
    /// <summary>
    /// Grey-world gains (Buchsbaum 1980): the mean of each channel over the road wedge sample (the same pixels as the
    /// road statistics) against the mean of the three; gain = grey / channel mean, clamped to [1/4, 4], in 1/256 fixed
    /// point. A grey road gives gains of 1 (256); an empty or black sample leaves the frame unchanged.
    /// </summary>
    private static unsafe void GreyWorldGains(byte* frameBase, long frameStep, int top, int w, int h, double vx, double vy,
        double halfBottom, int stride, out int gainB, out int gainG, out int gainR)
    {
        gainB = gainG = gainR = 256;
        long sb = 0, sg = 0, sr = 0;
        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* row = frameBase + (y * frameStep);
            for (int x = x0; x <= x1; x += stride)
            {
                byte* p = row + (3 * x);
                sb += p[0];
                sg += p[1];
                sr += p[2];
            }
        }

        if (sb > 0 && sg > 0 && sr > 0)
        {
            double grey = (sb + sg + sr) / 3.0;
            gainB = (int)Math.Round(256 * Math.Clamp(grey / sb, 0.25, 4));
            gainG = (int)Math.Round(256 * Math.Clamp(grey / sg, 0.25, 4));
            gainR = (int)Math.Round(256 * Math.Clamp(grey / sr, 0.25, 4));
        }
    }

    /// <summary>Columns of row <paramref name="y"/> inside the trapezoid (top-left, top-right, bottom-right, bottom-left), clipped to the frame.</summary>
    private static void RowSpan(double[] q, int y, int w, out int x0, out int x1)
    {
        double t = (y - q[1]) / (q[5] - q[1]);
        double xl = q[0] + ((q[6] - q[0]) * t);
        double xr = q[2] + ((q[4] - q[2]) * t);
        x0 = Math.Max(0, (int)Math.Ceiling(xl));
        x1 = Math.Min(w - 1, (int)Math.Floor(xr));
    }

    private static double Percentile(int[] hist, long total, double p)
    {
        if (total == 0)
        {
            return 0;
        }

        long target = (long)Math.Ceiling(p * total);
        long acc = 0;
        for (int i = 0; i < hist.Length; i++)
        {
            acc += hist[i];
            if (acc >= Math.Max(1, target))
            {
                return i;
            }
        }

        return 255;
    }

    /// <summary>
    /// Contrast-limited adaptive histogram equalisation (Zuiderveld 1994) of the blurred grey band of
    /// <see cref="GradientStage"/>, into the stage's own buffer: each tile's lightness histogram, clipped at
    /// <see cref="ColorOptions.ClaheClipLimit"/> times its mean bin count, is equalised and the mappings of the four
    /// nearest tiles are interpolated bilinearly, which stretches the faint local contrast of paint in a dark scene
    /// without the noise blow-up of plain equalisation. It maps the already blurred band (a smooth, locally monotone
    /// mapping nearly commutes with the blur), so the band is neither copied nor blurred a second time.
    /// </summary>
    private void Equalise(FrameWorkspace workspace)
    {
        int bandHeight = workspace.Height - workspace.BandTop;
        int tilesAcross = color.ClaheTilesAcross;
        int tilesDown = Math.Max(1, (int)Math.Round(tilesAcross * (double)bandHeight / workspace.Width));
        clahe ??= Cv2.CreateCLAHE(color.ClaheClipLimit, new Size(tilesAcross, tilesDown));
        clahe.Apply(workspace.Gradient.Blurred, equalisedBlur);
    }
}
