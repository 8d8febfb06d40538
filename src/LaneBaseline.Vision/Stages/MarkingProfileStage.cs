using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Measures, for every reported lane, how much its image looks like road paint across the line: the contrast of the
/// marking against the road beside it, the width of its evidence against the perspective marking width, the share of
/// its evidence that passed a paint-colour test, and how much of its near half has evidence. These are features for
/// the confidence calibration (<see cref="LaneEstimate.MarkingContrast"/> and the following fields); lanes and raw
/// scores are unchanged.
/// </summary>
/// <remarks>
/// For every other image row between the region's far edge and the bottom row at which the lane's polyline lies
/// inside the frame, with d the expected marking width at that row (the ridge gate's: <see cref="GradientOptions.MarkingWidthFraction"/>
/// × width at the bottom row, shrinking linearly to the horizon, at least 2 px):
/// (1) the row is supported when marking evidence lies within ±d of the lane's x; (2) on a supported row the evidence
/// run nearest to the lane's x gives the run width (capped at 4d) and its paint pixels (evidence 255 or 100, i.e. a
/// white or yellow colour test passed, against 160 for a ridge alone); (3) the blurred grey of <see cref="GradientStage"/>
/// gives the marking's Weber contrast at the run centre: (centre mean over the run − the brighter of the two side means
/// over [−2d, −d] and [d, 2d] from the run's edges) / max(that side mean, 8).
/// Per lane: <c>MarkingContrast</c> = median contrast over supported rows; <c>WidthMismatch</c> = median |log2(run width / d)|
/// (a painted line narrows with the perspective as d does; a specular streak of a lamp on a wet road keeps its image
/// width, so it is too narrow near the camera and too wide far away; verge texture gives scattered narrow specks);
/// <c>PaintShare</c> = paint pixels / evidence pixels of the runs; <c>NearSupport</c> = the share of supported rows in
/// the near half of the rows (bottom row to midway to the region's far edge): a lane whose near part is extrapolated
/// past missing evidence is where a fit goes off the paint; <c>ExtrapolatedShare</c> = the share of the lane's rows in the
/// frame below its nearest supported row (1 without support), and <c>BottomLeverage</c> = how many standard deviations of
/// the supported rows the bottom row lies from their mean (see <see cref="Leverage"/>): a boundary measured only near the
/// vanishing point and extrapolated to the bottom row has both large, a dashed line with a gap near the camera has them
/// small. All NaN when the lane has fewer than 4 rows in the frame.
/// The width test is the perspective-scaled dark–light–dark marking model as compared by Veit et al. (ITSC 2008),
/// applied to the lane's own evidence rather than per pixel. Pixel (x, y), origin top-left, y down.
/// <para>References: [1] T. Veit, J.-P. Tarel, P. Nicolle, P. Charbonnier, "Evaluation of Road Marking Feature
/// Extraction", Proc. 11th IEEE ITSC, 2008, DOI 10.1109/ITSC.2008.4732564 (marking width under perspective).
/// [2] Weber contrast (ΔL / L of the background): common practice in vision science.</para>
/// </remarks>
public sealed class MarkingProfileStage : IFrameStage
{
    /// <summary>Cap of <see cref="LaneEstimate.BottomLeverage"/>: the value of a lane with nothing to extrapolate from.</summary>
    internal const double MaxLeverage = 50;

    private const int RowStep = 2;
    private readonly GradientOptions gradient;
    private readonly double[] contrast = new double[4096];
    private readonly double[] widthError = new double[4096];

    /// <summary>Creates the stage.</summary>
    public MarkingProfileStage(GradientOptions gradient)
    {
        this.gradient = gradient;
    }

    /// <inheritdoc />
    public string Name => "marking";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        for (int i = 0; i < workspace.LaneCount; i++)
        {
            workspace.Lanes[i] = Measure(workspace, workspace.Lanes[i], workspace.LanePoints[i]);
        }
    }

    private unsafe LaneEstimate Measure(FrameWorkspace ws, LaneEstimate lane, double[] points)
    {
        int w = ws.Width, h = ws.Height, bandTop = ws.BandTop;
        int n = lane.PointCount;
        if (n < 2)
        {
            return lane;
        }

        double vy = ws.Region.VanishingY;
        int top = Math.Max(bandTop, (int)Math.Ceiling(ws.Region.RoiTop));
        int mid = (top + h - 1) / 2;
        double widthBottom = gradient.MarkingWidthFraction * w;
        byte* evBase = (byte*)ws.Color.Evidence.DataPointer;
        long evStep = ws.Color.Evidence.Step();
        byte* blurBase = (byte*)ws.Gradient.Blurred.DataPointer;
        long blurStep = ws.Gradient.Blurred.Step();
        int rows = 0, supported = 0, nearRows = 0, nearSupported = 0;
        int rowBottom = -1, rowTop = -1, supportNear = -1;
        double sumY = 0, sumYY = 0;
        long evidencePx = 0, paintPx = 0;
        int seg = 0;
        for (int y = h - 1; y >= top; y -= RowStep)
        {
            // The polyline runs near to far (y decreasing); advance to the segment holding row y.
            while (seg < n - 1 && points[(2 * seg) + 3] > y)
            {
                seg++;
            }

            if (seg >= n - 1)
            {
                break;
            }

            double ya = points[(2 * seg) + 1], yb = points[(2 * seg) + 3];
            if (y > ya || y < yb || ya == yb)
            {
                continue;
            }

            double x = points[2 * seg] + ((points[(2 * seg) + 2] - points[2 * seg]) * (y - ya) / (yb - ya));
            double scale = (y - vy) / (h - 1 - vy);
            int d = Math.Max(2, (int)Math.Round(widthBottom * scale));
            int xi = (int)Math.Round(x);
            if (xi - (3 * d) < 0 || xi + (3 * d) >= w)
            {
                continue;
            }

            rows++;
            rowBottom = rowBottom < 0 ? y : rowBottom;
            rowTop = y;
            bool near = y >= mid;
            nearRows += near ? 1 : 0;
            byte* ev = evBase + (y * evStep);
            int hit = -1;
            for (int k = 0; k <= d && hit < 0; k++)
            {
                hit = ev[xi - k] != 0 ? xi - k : ev[xi + k] != 0 ? xi + k : -1;
            }

            if (hit < 0)
            {
                continue;
            }

            supported++;
            nearSupported += near ? 1 : 0;
            supportNear = supportNear < 0 ? y : supportNear;
            double dy = y - rowBottom; // relative to the lane's bottom row: small numbers, no cancellation
            sumY += dy;
            sumYY += dy * dy;
            int a = hit, b = hit, cap = 4 * d;
            while (a > 0 && ev[a - 1] != 0 && b - a < cap)
            {
                a--;
            }

            while (b < w - 1 && ev[b + 1] != 0 && b - a < cap)
            {
                b++;
            }

            for (int k = a; k <= b; k++)
            {
                evidencePx++;
                paintPx += ev[k] == 255 || ev[k] == 100 ? 1 : 0;
            }

            int width = b - a + 1;
            int slot = supported - 1;
            if (slot < contrast.Length)
            {
                widthError[slot] = Math.Abs(Math.Log2((double)width / d));
                byte* s = blurBase + ((y - bandTop) * blurStep);
                contrast[slot] = Weber(s, a, b, d, w);
            }
        }

        if (rows < 4)
        {
            return lane;
        }

        int m = Math.Min(supported, contrast.Length);
        return lane with
        {
            MarkingContrast = m > 0 ? Median(contrast, m) : 0,
            WidthMismatch = m > 0 ? Median(widthError, m) : double.NaN,
            PaintShare = evidencePx > 0 ? (double)paintPx / evidencePx : 0,
            NearSupport = nearRows > 0 ? (double)nearSupported / nearRows : double.NaN,
            ExtrapolatedShare = supported > 0 && rowBottom > rowTop ? (double)(rowBottom - supportNear) / (rowBottom - rowTop) : 1,
            BottomLeverage = Leverage(supported, sumY, sumYY),
        };
    }

    /// <summary>
    /// How far the lane's bottom row lies outside its supported rows, in standard deviations of their rows:
    /// |0 − mean| / sd with the rows taken relative to the bottom row. The variance of a least-squares line's
    /// prediction at x0 is σ²·(1/n + (x0 − x̄)² / Sxx) with Sxx = n·sd²; this is the square root of the second term times
    /// n, which does not depend on how many rows the frame's size gives. Rows measured evenly over the whole lane give
    /// √3 ≈ 1.73; a short run of rows far up gives tens. Capped at <see cref="MaxLeverage"/>, which is also the value
    /// with fewer than two supported rows or a spread below one row.
    /// </summary>
    internal static double Leverage(int n, double sumY, double sumYY)
    {
        // Source: prediction variance of simple linear regression outside the data, from memory (e.g. Montgomery, Peck &
        // Vining, Introduction to Linear Regression Analysis, the prediction of new observations).
        if (n < 2)
        {
            return MaxLeverage;
        }

        double mean = sumY / n;
        double variance = Math.Max(0, (sumYY / n) - (mean * mean));
        return variance < 1 ? MaxLeverage : Math.Min(MaxLeverage, Math.Abs(mean) / Math.Sqrt(variance));
    }

    private static unsafe double Weber(byte* s, int a, int b, int d, int w)
    {
        int centre = 0;
        for (int k = a; k <= b; k++)
        {
            centre += s[k];
        }

        double c = (double)centre / (b - a + 1);
        double left = SideMean(s, a - (2 * d), a - d, w), right = SideMean(s, b + d, b + (2 * d), w);
        double side = Math.Max(left, right);
        return (c - side) / Math.Max(side, 8);
    }

    private static unsafe double SideMean(byte* s, int from, int to, int w)
    {
        from = Math.Max(0, from);
        to = Math.Min(w - 1, to);
        if (to < from)
        {
            return 0;
        }

        int sum = 0;
        for (int k = from; k <= to; k++)
        {
            sum += s[k];
        }

        return (double)sum / (to - from + 1);
    }

    private static double Median(double[] values, int count)
    {
        Array.Sort(values, 0, count);
        return count % 2 == 1 ? values[count / 2] : 0.5 * (values[(count / 2) - 1] + values[count / 2]);
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
