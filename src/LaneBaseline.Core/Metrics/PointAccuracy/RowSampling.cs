using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics.PointAccuracy;

/// <summary>
/// The row sampling of the point accuracy metric: truth and prediction are sampled at image rows <c>height-1, height-11, …</c>; a
/// prediction row is correct when its x is within the truth lane's tolerance, widened by <c>1/cos(atan(a))</c>
/// for the slope a of the least-squares line <c>x = a*y + b</c> through the truth samples.
/// </summary>
/// <remarks>Coordinates are pixels, x right, y down. Rows are sampled every 10 px from the bottom row upward.</remarks>
public static class RowSampling
{
    /// <summary>Spacing of the sample rows in pixels.</summary>
    public const int RowStepPx = 10;

    /// <summary>A truth lane is matched when its pair accuracy reaches 17/20 = 0.85 (compared exactly).</summary>
    public static bool IsMatched(int correct, int samples) => samples > 0 && correct * 20L >= 17L * samples;

    /// <summary>The sample rows of a lane: <c>height-1-10k</c> for k = 0, 1, … within its closed y-extent.</summary>
    public static void SampleRows(IReadOnlyList<LanePoint> points, int height, List<int> rows, List<double> xs)
    {
        rows.Clear();
        xs.Clear();
        (double ymin, double ymax) = Polylines.YExtent(points);
        for (int row = height - 1; row >= 0; row -= RowStepPx)
        {
            if (row < ymin)
            {
                break;
            }

            if (row <= ymax && Polylines.TryXAt(points, row, out double x))
            {
                rows.Add(row);
                xs.Add(x);
            }
        }
    }

    /// <summary>Slope a of the least-squares line <c>x = a*y + b</c> through samples; 0 with fewer than 2.</summary>
    public static double FitSlope(List<int> rows, List<double> xs)
    {
        int n = rows.Count;
        if (n < 2)
        {
            return 0;
        }

        double my = 0, mx = 0;
        for (int i = 0; i < n; i++)
        {
            my += rows[i];
            mx += xs[i];
        }

        my /= n;
        mx /= n;
        double sxy = 0, syy = 0;
        for (int i = 0; i < n; i++)
        {
            double dy = rows[i] - my;
            sxy += dy * (xs[i] - mx);
            syy += dy * dy;
        }

        return syy == 0 ? 0 : sxy / syy;
    }

    /// <summary>The horizontal tolerance for a truth lane of slope a: <c>baseTolerance / cos(atan(a))</c>.</summary>
    public static double Tolerance(double baseTolerancePx, double slope) => baseTolerancePx / Math.Cos(Math.Atan(slope));

    /// <summary>Number of truth sample rows at which the prediction is present and |dx| &lt; tolerance.</summary>
    public static int CountCorrect(List<int> rows, List<double> xs, double tolerancePx, IReadOnlyList<LanePoint> prediction)
    {
        (double ymin, double ymax) = Polylines.YExtent(prediction);
        int correct = 0;
        for (int i = 0; i < rows.Count; i++)
        {
            int row = rows[i];
            if (row >= ymin && row <= ymax && Polylines.TryXAt(prediction, row, out double x) && Math.Abs(x - xs[i]) < tolerancePx)
            {
                correct++;
            }
        }

        return correct;
    }
}
