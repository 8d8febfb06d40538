using LaneBaseline.Core;
using LaneBaseline.Core.Calibration;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.Calibration;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Random;
using LaneBaseline.Core.Results;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.Optimization;
using Xunit;

namespace LaneBaseline.Core.Tests.Calibration;

public sealed class CalibrationTests
{
    [Fact]
    public void Isotonic_MatchesTheScikitLearnDocumentationExample()
    {
        // Source: scikit-learn documentation of sklearn.isotonic.isotonic_regression, example
        // isotonic_regression([5, 3, 1, 2, 8, 10, 7, 9, 6, 4]) -> [2.75 x4, 7.33... x6] (from memory), derived by hand
        // with pool-adjacent-violators: 5>3 pool 4; 4>1 pool (5,3,1)=3; 3>2 pool (5,3,1,2)=11/4=2.75. Then 8 | 10>7
        // pool 8.5; 9 | 9>6 pool 7.5, 8.5>7.5 pool (10,7,9,6)=8; 8>4 pool (10,7,9,6,4)=7.2, 8>7.2 pool
        // (8,10,7,9,6,4)=44/6=7.333.
        double[] y = [5, 3, 1, 2, 8, 10, 7, 9, 6, 4];
        double[] x = [.. Enumerable.Range(0, y.Length).Select(i => (double)i)];
        (double[] kx, double[] ky) = IsotonicRegression.Fit(x, y);
        Assert.Equal(x, kx);
        for (int i = 0; i < 4; i++)
        {
            Assert.Equal(2.75, ky[i], 12);
        }

        for (int i = 4; i < 10; i++)
        {
            Assert.Equal(44.0 / 6, ky[i], 12);
        }
    }

    [Fact]
    public void Isotonic_PoolsTiedInputs_AndInterpolatesLinearly()
    {
        // Hand-derived: x = (1, 1, 2, 3), y = (0, 1, 0, 1). Ties pooled first: x=1 -> 0.5 (weight 2); then 0.5 > 0
        // at x=2 pools (0, 1, 0) to 1/3 at x=1 and x=2; x=3 -> 1. Interpolation halfway between x=2 and x=3 gives
        // (1/3 + 1)/2 = 2/3; outside the knots the end values (common practice, as scikit-learn's out_of_bounds="clip").
        (double[] kx, double[] ky) = IsotonicRegression.Fit([1, 1, 2, 3], [0, 1, 0, 1]);
        Assert.Equal([1.0, 2, 3], kx);
        Assert.Equal(1.0 / 3, ky[0], 12);
        Assert.Equal(1.0 / 3, ky[1], 12);
        Assert.Equal(1.0, ky[2], 12);
        Assert.Equal(2.0 / 3, IsotonicRegression.Interpolate(kx, ky, 2.5), 12);
        Assert.Equal(1.0 / 3, IsotonicRegression.Interpolate(kx, ky, -5), 12);
        Assert.Equal(1.0, IsotonicRegression.Interpolate(kx, ky, 9), 12);
    }

    [Fact]
    public void Logistic_OneBinaryFeature_WithoutPenalty_IsTheClosedForm()
    {
        // Hand-derived: with one 0/1 feature and no penalty the maximum-likelihood fit reproduces the two group rates
        // exactly: x=0 has 1 of 4 positive, so b = logit(1/4) = ln(1/3); x=1 has 3 of 4, so b + w = ln 3, w = 2 ln 3.
        double[][] x = [[0], [0], [0], [0], [1], [1], [1], [1]];
        double[] y = [1, 0, 0, 0, 1, 1, 1, 0];
        (double b, double[] w) = LogisticRegression.Fit(x, y, 0);
        Assert.Equal(Math.Log(1.0 / 3), b, 6);
        Assert.Equal(2 * Math.Log(3), w[0], 6);
    }

    [Fact]
    public void Logistic_WithPenalty_AgreesWithMathNetBfgs()
    {
        // Reference: MathNet.Numerics' BFGS minimiser on the same penalised negative log-likelihood
        // −Σ[y log p + (1−y) log(1−p)] + (λ/2)‖w‖² (intercept unpenalised). Invented data for the comparison only.
        var rng = new SplitMix64(17);
        var x = new List<double[]>();
        var y = new List<double>();
        for (int i = 0; i < 300; i++)
        {
            double a = rng.NextGaussian(), c = rng.NextGaussian(), d = rng.NextDouble();
            double p = LogisticRegression.Sigmoid(0.4 + (1.5 * a) - (0.7 * c) + (0.3 * d));
            x.Add([a, c, d]);
            y.Add(rng.NextDouble() < p ? 1 : 0);
        }

        const double lambda = 2.5;
        (double b, double[] w) = LogisticRegression.Fit(x, y, lambda);

        IObjectiveFunction objective = ObjectiveFunction.Gradient(
            beta =>
            {
                double nll = 0;
                for (int i = 0; i < x.Count; i++)
                {
                    double z = beta[0] + (beta[1] * x[i][0]) + (beta[2] * x[i][1]) + (beta[3] * x[i][2]);
                    nll += Math.Log(1 + Math.Exp(z)) - (y[i] * z);
                }

                return nll + (lambda / 2 * ((beta[1] * beta[1]) + (beta[2] * beta[2]) + (beta[3] * beta[3])));
            },
            beta =>
            {
                Vector<double> g = Vector<double>.Build.Dense(4);
                for (int i = 0; i < x.Count; i++)
                {
                    double z = beta[0] + (beta[1] * x[i][0]) + (beta[2] * x[i][1]) + (beta[3] * x[i][2]);
                    double r = LogisticRegression.Sigmoid(z) - y[i];
                    g[0] += r;
                    for (int k = 0; k < 3; k++)
                    {
                        g[k + 1] += r * x[i][k];
                    }
                }

                for (int k = 1; k < 4; k++)
                {
                    g[k] += lambda * beta[k];
                }

                return g;
            });
        var result = new BfgsMinimizer(1e-10, 1e-10, 1e-10, 2000).FindMinimum(objective, Vector<double>.Build.Dense(4));
        Assert.Equal(result.MinimizingPoint[0], b, 5);
        for (int k = 0; k < 3; k++)
        {
            Assert.Equal(result.MinimizingPoint[k + 1], w[k], 5);
        }
    }

    [Fact]
    public void Ece_OfTheScikitLearnCalibrationCurveExample_DerivedForTenBins()
    {
        // Source: the data of the scikit-learn documentation example of sklearn.calibration.calibration_curve
        // (y_true = [0,0,0,0,1,1,1,1,1], y_prob = [0.1,0.2,0.3,0.4,0.65,0.7,0.8,0.9,1.0]; from memory), with the
        // 10 equal-width bins of Naeini et al. (AAAI 2015) derived by hand: bins 1-4 hold one negative each
        // (gaps 0.1, 0.2, 0.3, 0.4); bins 6, 7, 8 one positive each (gaps 0.35, 0.3, 0.2); bin 9 holds 0.9 and 1.0
        // (1.0 belongs to the last bin), mean 0.95, precision 1, gap 0.05 over 2 lanes.
        // ECE = (0.1 + 0.2 + 0.3 + 0.4 + 0.35 + 0.3 + 0.2 + 2·0.05) / 9 = 1.95 / 9.
        var tally = new ReliabilityTally();
        tally.Add(Frame([0.1, 0.2, 0.3, 0.4, 0.65, 0.7, 0.8, 0.9, 1.0], [false, false, false, false, true, true, true, true, true], truthLanes: 5));
        Assert.Equal(1.95 / 9, tally.ExpectedCalibrationError(), 12);
        ReliabilityTally.Bin[] table = tally.Table();
        Assert.Equal(0, table[0].Lanes);
        Assert.True(double.IsNaN(table[0].MeanScore));
        Assert.Equal(2, table[9].Lanes);
        Assert.Equal(0.95, table[9].MeanScore, 12);
        Assert.Equal(1.0, table[9].Precision, 12);

        // F1 over the score threshold (hand-derived): t = 0.65 keeps 5 lanes, all 5 true positives of 5 truth lanes,
        // F1 = 1; every other distinct threshold is lower.
        ReliabilityTally.CurvePoint best = tally.Best()!.Value;
        Assert.Equal(0.65, best.MinScore);
        Assert.Equal(1.0, best.F1, 12);
        ReliabilityTally.CurvePoint half = tally.Curve()[10]; // score >= 0.50
        Assert.Equal(5, half.PredLanes);
        Assert.Equal(1.0, half.Precision, 12);
    }

    [Fact]
    public void OfFrame_MarksHungarianPairsAtIou050_AndSkipsUnscoredLanes()
    {
        // Hand-made counts: 2 truth lanes, 3 predictions; truth 0 -> prediction 1 with IoU 60/100 = 0.6 (hit),
        // truth 1 -> prediction 0 with IoU 40/100 = 0.4 (assigned but below 0.50: a miss); prediction 2 has no score.
        Lane[] p = [Lane(0.9), Lane(0.8), Lane(null)];
        long[] inter = [0, 60, 0, 40, 0, 0];
        long[] areaT = [80, 70], areaP = [70, 80, 50];
        (double[] scores, bool[] hits) = ReliabilityTally.OfFrame(p, [1, 0], inter, areaT, areaP);
        Assert.Equal([0.9, 0.8], scores);
        Assert.Equal([false, true], hits);
    }

    [Fact]
    public void Fit_ThenApply_IsMonotoneInTheLogisticOutput_AndReproducesThePavLevels()
    {
        var rng = new SplitMix64(5);
        var rows = new List<double[]>();
        var hits = new List<bool>();
        for (int i = 0; i < 400; i++)
        {
            var lane = new LaneEstimate(1, rng.NextDouble(), default, rng.NextDouble(10, 500), rng.NextDouble(), rng.NextDouble(0, 3), 10);
            rows.Add(LaneFeatures.Of(lane));
            hits.Add(rng.NextDouble() < lane.Score);
        }

        CalibrationOptions c = LaneCalibration.FitAll(LaneFeatures.Names, rows, hits, 1, isotonic: true);
        Assert.Empty(new PipelineOptions { Calibration = c }.Validate());
        Assert.True(c.Weights[0] > 0); // the raw score drives the outcome here
        var map = new LaneCalibration(c);
        var logistic = new LaneCalibration(c with { IsotonicX = [], IsotonicY = [] });
        double[] z = [.. rows.Select(r => logistic.FromFeatures(r))];
        double[] p = [.. rows.Select(r => map.FromFeatures(r))];
        int[] order = [.. Enumerable.Range(0, z.Length).OrderBy(i => z[i])];
        for (int k = 1; k < order.Length; k++)
        {
            Assert.True(p[order[k]] >= p[order[k - 1]]);
        }

        // On the fitted points the stored knots reproduce the PAV fit exactly (only level ends are kept).
        (double[] kx, double[] ky) = IsotonicRegression.Fit(z, [.. hits.Select(h => h ? 1.0 : 0.0)]);
        for (int i = 0; i < kx.Length; i++)
        {
            Assert.Equal(ky[i], IsotonicRegression.Interpolate(c.IsotonicX, c.IsotonicY, kx[i]), 12);
        }

        // The mean calibrated probability equals the positive rate on the fitting data (a PAV property).
        Assert.Equal(hits.Count(h => h) / 400.0, p.Average(), 9);
    }

    [Fact]
    public void Fit_DropsAFeatureWhoseWeightTakesTheWrongSign()
    {
        // Constructed: the outcome rises with the raw score and, against the stated sign (+1), falls with coverage.
        // The unconstrained fit gives coverage a negative weight; the constrained fit drops it and keeps the rest.
        var rng = new SplitMix64(11);
        var rows = new List<double[]>();
        var hits = new List<bool>();
        for (int i = 0; i < 500; i++)
        {
            var lane = new LaneEstimate(1, rng.NextDouble(), default, 100, rng.NextDouble(), 1, 10);
            rows.Add(LaneFeatures.Of(lane));
            hits.Add(rng.NextDouble() < LogisticRegression.Sigmoid((4 * lane.Score) - (3 * lane.Coverage)));
        }

        CalibrationOptions all = LaneCalibration.FitAll(LaneFeatures.Names, rows, hits, 1, isotonic: false);
        Assert.True(all.Weights[LaneFeatures.IndexOf("coverage")] < 0);
        CalibrationOptions kept = LaneCalibration.Fit(LaneFeatures.Names, rows, hits, 1, isotonic: false);
        Assert.DoesNotContain("coverage", kept.Features);
        Assert.Contains("rawScore", kept.Features);
        for (int k = 0; k < kept.Features.Length; k++)
        {
            Assert.True(LaneFeatures.All[LaneFeatures.IndexOf(kept.Features[k])].Sign * kept.Weights[k] >= 0);
        }
    }

    [Fact]
    public void Preset_RoundTrips_AndAbsentCalibration_LeavesTheTextAndHashAlone()
    {
        var c = new CalibrationOptions
        {
            Features = ["rawScore", "coverage"],
            Mean = [0.5, 0.25],
            Scale = [0.2, 0.125],
            Weights = [1.5, -0.1],
            Intercept = 0.3,
            IsotonicX = [0.1, 0.9],
            IsotonicY = [0.05, 0.95],
            FittedLanes = 10,
            FittedPositives = 7,
        };
        var options = new PipelineOptions { Calibration = c };
        string yaml = PresetLoader.ToYaml(options);
        Assert.Contains("calibration:\n  features: [rawScore, coverage]\n", yaml, StringComparison.Ordinal);
        Assert.Equal(options, PresetLoader.Parse(yaml, "rt.yaml"));
        Assert.DoesNotContain("calibration", PresetLoader.ToYaml(new PipelineOptions()), StringComparison.Ordinal);
        Assert.NotEqual(PresetLoader.Hash(new PipelineOptions()), PresetLoader.Hash(options));
    }

    [Theory]
    [InlineData("calibration:\n  features: [rawScore, contrastOfTheFuture]\n  mean: [0, 0]\n  scale: [1, 1]\n  weights: [1, 1]\n", "p.yaml:2: calibration.features: feature 'contrastOfTheFuture' is not known")]
    [InlineData("calibration:\n  features: [rawScore]\n  mean: [0, 0]\n  scale: [1]\n  weights: [1]\n", "p.yaml:3: calibration.mean: give one value per feature")]
    [InlineData("calibration:\n  features: [rawScore]\n  mean: [0]\n  scale: [0]\n  weights: [1]\n", "p.yaml:4: calibration.scale: values must be > 0")]
    [InlineData("calibration:\n  features: rawScore\n", "p.yaml:2: calibration.features: expected a list")]
    [InlineData("calibration:\n  features: [rawScore]\n  mean: [0]\n  scale: [1]\n  weights: [1]\n  isotonicX: [0.5, 0.2]\n  isotonicY: [0, 1]\n", "p.yaml:6: calibration.isotonicX: knots must be strictly increasing")]
    public void BadCalibration_NamesFileLineAndKey(string yaml, string expected)
    {
        var ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "p.yaml"));
        Assert.StartsWith(expected, ex.Message, StringComparison.Ordinal);
    }

    private static Lane Lane(double? score) => new() { Points = [new LanePoint(0, 10), new LanePoint(1, 0)], Score = score };

    private static FrameScore Frame(double[] scores, bool[] hits, int truthLanes) => new()
    {
        Frame = "f",
        Tags = [],
        TruthLanes = truthLanes,
        LaneScores = scores,
        LaneHits = hits,
    };
}
