using LaneBaseline.Core.Calibration;

namespace LaneBaseline.Core.Options;

/// <summary>
/// A fitted confidence calibration (written by <c>tune --calibrate</c>): a lane's score becomes
/// isotonic(σ(intercept + Σ weights[k]·(feature[k] − mean[k]) / scale[k])), the probability that the lane is a true
/// positive at IoU 0.50. Absent from a preset, scores are the raw confidences.
/// </summary>
public sealed record CalibrationOptions
{
    /// <summary>Feature names, from LaneFeatures.Names (1–4 names in this build). Default empty (set by <c>tune --calibrate</c>).</summary>
    public string[] Features { get; init; } = [];

    /// <summary>Per-feature mean subtracted before weighting (one per feature, finite: −1e308–1e308). Default empty.</summary>
    public double[] Mean { get; init; } = [];

    /// <summary>Per-feature scale divided by before weighting (one per feature, &gt; 0: 1e-308–1e308). Default empty.</summary>
    public double[] Scale { get; init; } = [];

    /// <summary>Logistic weights on the standardised features (one per feature, finite: −1e308–1e308). Default empty.</summary>
    public double[] Weights { get; init; } = [];

    /// <summary>Logistic intercept (finite: −1e308–1e308). Default 0.</summary>
    public double Intercept { get; init; }

    /// <summary>Isotonic knots: logistic outputs (strictly increasing, 0–1); empty for the logistic map alone. Default empty.</summary>
    public double[] IsotonicX { get; init; } = [];

    /// <summary>Isotonic knots: calibrated probabilities (non-decreasing, 0–1; one per isotonicX knot). Default empty.</summary>
    public double[] IsotonicY { get; init; } = [];

    /// <summary>Lanes the mapping was fitted on (information only, 0–2147483647). Default 0.</summary>
    public int FittedLanes { get; init; }

    /// <summary>Of those, true positives at IoU 0.50 (information only, 0–2147483647, at most fittedLanes). Default 0.</summary>
    public int FittedPositives { get; init; }

    /// <summary>Value equality, element by element over the lists (a record compares arrays by reference).</summary>
    public bool Equals(CalibrationOptions? other) =>
        other is not null
        && Features.SequenceEqual(other.Features, StringComparer.Ordinal)
        && Mean.SequenceEqual(other.Mean) && Scale.SequenceEqual(other.Scale) && Weights.SequenceEqual(other.Weights)
        && Intercept.Equals(other.Intercept)
        && IsotonicX.SequenceEqual(other.IsotonicX) && IsotonicY.SequenceEqual(other.IsotonicY)
        && FittedLanes == other.FittedLanes && FittedPositives == other.FittedPositives;

    /// <inheritdoc />
    public override int GetHashCode() => HashCode.Combine(Features.Length, Intercept, FittedLanes, FittedPositives);

    internal void Validate(List<OptionsFinding> f)
    {
        if (Features is null || Features.Length == 0)
        {
            f.Add(new OptionsFinding("calibration.features", "give at least one feature"));
            return;
        }

        foreach (string name in Features)
        {
            if (LaneFeatures.IndexOf(name) < 0)
            {
                f.Add(new OptionsFinding("calibration.features", $"feature '{name}' is not known to this build (known: {string.Join(", ", LaneFeatures.Names)})"));
            }
        }

        if (Features.Distinct(StringComparer.Ordinal).Count() != Features.Length)
        {
            f.Add(new OptionsFinding("calibration.features", "a feature is named twice"));
        }

        (string Key, double[]? Values)[] perFeature = [("calibration.mean", Mean), ("calibration.scale", Scale), ("calibration.weights", Weights)];
        foreach ((string key, double[]? values) in perFeature)
        {
            if (values is null || values.Length != Features.Length)
            {
                f.Add(new OptionsFinding(key, $"give one value per feature ({Features.Length})"));
            }
            else if (values.Any(v => !double.IsFinite(v)))
            {
                f.Add(new OptionsFinding(key, "values must be finite"));
            }
        }

        if (Scale is not null && Scale.Any(v => !(v > 0)))
        {
            f.Add(new OptionsFinding("calibration.scale", "values must be > 0"));
        }

        if (!double.IsFinite(Intercept))
        {
            f.Add(new OptionsFinding("calibration.intercept", "must be finite"));
        }

        double[] ix = IsotonicX ?? [], iy = IsotonicY ?? [];
        if (ix.Length != iy.Length)
        {
            f.Add(new OptionsFinding("calibration.isotonicY", "give one value per isotonicX knot"));
        }
        else
        {
            for (int i = 0; i < ix.Length; i++)
            {
                if (!(ix[i] >= 0 && ix[i] <= 1) || (i > 0 && !(ix[i] > ix[i - 1])))
                {
                    f.Add(new OptionsFinding("calibration.isotonicX", "knots must be strictly increasing within [0, 1]"));
                    break;
                }

                if (!(iy[i] >= 0 && iy[i] <= 1) || (i > 0 && !(iy[i] >= iy[i - 1])))
                {
                    f.Add(new OptionsFinding("calibration.isotonicY", "values must be non-decreasing within [0, 1]"));
                    break;
                }
            }
        }

        if (FittedLanes < 0 || FittedPositives < 0 || FittedPositives > FittedLanes)
        {
            f.Add(new OptionsFinding("calibration.fittedPositives", "must be within 0–fittedLanes"));
        }
    }
}
