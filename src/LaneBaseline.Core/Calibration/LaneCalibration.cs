using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;

namespace LaneBaseline.Core.Calibration;

/// <summary>Applies a stored <see cref="CalibrationOptions"/> to lanes: their probability of being a true positive at IoU 0.50.</summary>
public sealed class LaneCalibration
{
    private readonly CalibrationOptions options;
    private readonly int[] indices;
    private readonly double[] features;

    /// <summary>Prepares a validated calibration.</summary>
    /// <exception cref="BadInputException">A feature is not known to this build.</exception>
    public LaneCalibration(CalibrationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        this.options = options;
        indices = new int[options.Features.Length];
        for (int i = 0; i < indices.Length; i++)
        {
            indices[i] = LaneFeatures.IndexOf(options.Features[i]);
            if (indices[i] < 0)
            {
                throw new BadInputException($"calibration.features: feature '{options.Features[i]}' is not known to this build");
            }
        }

        features = new double[indices.Length];
    }

    /// <summary>The calibrated probability of a lane (not thread-safe: one instance per pipeline).</summary>
    public double Probability(in LaneEstimate lane)
    {
        LaneFeatures.Of(lane, indices, features);
        return FromFeatures(features);
    }

    /// <summary>The calibrated probability of one feature vector in the stored feature order.</summary>
    public double FromFeatures(ReadOnlySpan<double> values)
    {
        double z = options.Intercept;
        for (int k = 0; k < values.Length; k++)
        {
            z += options.Weights[k] * (values[k] - options.Mean[k]) / options.Scale[k];
        }

        double p = LogisticRegression.Sigmoid(z);
        return options.IsotonicX.Length == 0 ? p : IsotonicRegression.Interpolate(options.IsotonicX, options.IsotonicY, p);
    }

    /// <summary>
    /// Fits a calibration as <see cref="FitAll"/> does, then, while a weight has the opposite sign to the one
    /// <see cref="LaneFeatures.All"/> states for its feature, drops the feature with the largest such weight (in
    /// standardised units) and fits again. The stored feature list names only the features kept.
    /// </summary>
    public static CalibrationOptions Fit(IReadOnlyList<string> names, IReadOnlyList<double[]> rows, IReadOnlyList<bool> hits, double lambda, bool isotonic)
    {
        ArgumentNullException.ThrowIfNull(names);
        ArgumentNullException.ThrowIfNull(rows);
        var keep = Enumerable.Range(0, names.Count).ToList();
        while (true)
        {
            string[] kept = [.. keep.Select(k => names[k])];
            double[][] sub = [.. rows.Select(r => keep.Select(k => r[k]).ToArray())];
            CalibrationOptions fit = FitAll(kept, sub, hits, lambda, isotonic);
            int worst = -1;
            double worstWeight = 0;
            for (int k = 0; k < kept.Length; k++)
            {
                int sign = LaneFeatures.All[LaneFeatures.IndexOf(kept[k])].Sign;
                double wrong = -sign * fit.Weights[k];
                if (wrong > worstWeight)
                {
                    worst = k;
                    worstWeight = wrong;
                }
            }

            if (worst < 0 || keep.Count == 1)
            {
                return fit;
            }

            keep.RemoveAt(worst);
        }
    }

    /// <summary>
    /// Fits a calibration on every given feature: standardises each feature (mean, population standard deviation; 1 when constant), fits an
    /// L2-regularised logistic regression, then (optionally) isotonic regression of the outcomes on its outputs,
    /// keeping only the knots where the fitted step function changes (its first and last point per level).
    /// </summary>
    /// <param name="names">Feature names (from <see cref="LaneFeatures.Names"/>).</param>
    /// <param name="rows">Feature rows, in the order of <paramref name="names"/>.</param>
    /// <param name="hits">Whether each lane was a true positive at IoU 0.50.</param>
    /// <param name="lambda">L2 penalty on the standardised weights.</param>
    /// <param name="isotonic">Whether to follow the logistic map with isotonic regression.</param>
    public static CalibrationOptions FitAll(IReadOnlyList<string> names, IReadOnlyList<double[]> rows, IReadOnlyList<bool> hits, double lambda, bool isotonic)
    {
        ArgumentNullException.ThrowIfNull(names);
        ArgumentNullException.ThrowIfNull(rows);
        ArgumentNullException.ThrowIfNull(hits);
        int d = names.Count, n = rows.Count;
        var mean = new double[d];
        var scale = new double[d];
        for (int k = 0; k < d; k++)
        {
            double s = 0;
            for (int i = 0; i < n; i++)
            {
                s += rows[i][k];
            }

            mean[k] = n == 0 ? 0 : s / n;
            double v = 0;
            for (int i = 0; i < n; i++)
            {
                v += (rows[i][k] - mean[k]) * (rows[i][k] - mean[k]);
            }

            double sd = n == 0 ? 0 : Math.Sqrt(v / n);
            scale[k] = sd > 1e-12 ? sd : 1;
        }

        var z = new double[n][];
        var y = new double[n];
        for (int i = 0; i < n; i++)
        {
            z[i] = new double[d];
            for (int k = 0; k < d; k++)
            {
                z[i][k] = (rows[i][k] - mean[k]) / scale[k];
            }

            y[i] = hits[i] ? 1 : 0;
        }

        (double b, double[] w) = LogisticRegression.Fit(z, y, lambda);
        var fitted = new CalibrationOptions
        {
            Features = [.. names],
            Mean = mean,
            Scale = scale,
            Weights = w,
            Intercept = b,
            FittedLanes = n,
            FittedPositives = y.Count(v => v > 0),
        };
        if (!isotonic || n == 0)
        {
            return fitted;
        }

        var logistic = new LaneCalibration(fitted);
        var p = new double[n];
        for (int i = 0; i < n; i++)
        {
            p[i] = logistic.FromFeatures(rows[i]);
        }

        (double[] kx, double[] ky) = IsotonicRegression.Fit(p, y);
        var keepX = new List<double>();
        var keepY = new List<double>();
        for (int i = 0; i < kx.Length; i++)
        {
            bool first = i == 0 || ky[i - 1] != ky[i], last = i == kx.Length - 1 || ky[i + 1] != ky[i];
            if (first || last)
            {
                keepX.Add(kx[i]);
                keepY.Add(ky[i]);
            }
        }

        return fitted with { IsotonicX = [.. keepX], IsotonicY = [.. keepY] };
    }
}
