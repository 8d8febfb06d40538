using System.Globalization;
using System.Text;
using LaneBaseline.Core;
using LaneBaseline.Core.Calibration;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Cli.Commands;

/// <summary>
/// <c>tune --calibrate</c>: runs the pipeline of a preset (its calibration and tracking off) on labelled frames,
/// marks each reported lane as a true positive at IoU 0.50 or not with the scorer's own matching
/// (<see cref="FrameScorer"/>: rasterised IoU, Hungarian assignment), fits <see cref="LaneCalibration"/> from the
/// lanes' features (<see cref="LaneFeatures"/>) and writes the preset text with its <c>calibration</c> section
/// replaced. Frames are processed independently (one pipeline per worker, results gathered by frame), so the
/// output does not depend on <c>--threads</c>.
/// </summary>
internal sealed class CalibrationRunner(TuneRequest request, double lambda, bool isotonic, TextWriter stderr)
{
    /// <summary>Where to write the per-lane feature table (CSV), or null.</summary>
    public string? TablePath { get; init; }

    public CalibrationSummary Run()
    {
        PipelineOptions options = KnownPresets.Resolve(request.ConfigSource);
        string baseText = IsName(request.ConfigSource) ? KnownPresets.GetText(request.ConfigSource) : File.ReadAllText(request.ConfigSource);
        PipelineOptions raw = options with { Calibration = null, Tracking = options.Tracking with { Enabled = false } };
        List<LaneRecord> truth = LaneFileReader.ReadTruth(request.Truth);
        var images = FrameListing.ListImages(request.Frames).ToDictionary(i => i.Key, StringComparer.Ordinal);
        var items = new FrameItem[truth.Count];
        for (int i = 0; i < truth.Count; i++)
        {
            items[i] = images.TryGetValue(truth[i].Frame, out FrameItem? item) ? item
                : throw BadInputException.At(request.Truth, truth[i].LineNumber, "frame", "no image '" + truth[i].Frame + "' under " + request.Frames);
        }

        var perFrame = new (double[][] Features, bool[] Hits, double[] RawScores)[truth.Count];
        int workers = Math.Min(request.Threads, truth.Count);
        int done = 0;
        Parallel.For(0, workers, new ParallelOptions { MaxDegreeOfParallelism = workers }, w =>
        {
            using var pipeline = new LanePipeline(raw);
            using var rasterizer = new OpenCvLaneRasterizer();
            var scorer = new FrameScorer(rasterizer, new ScoreSettings());
            for (int i = w; i < truth.Count; i += workers)
            {
                perFrame[i] = Measure(pipeline, scorer, items[i], truth[i]);
                int n = Interlocked.Increment(ref done);
                if (n % 100 == 0)
                {
                    lock (stderr)
                    {
                        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"calibrate: {n}/{truth.Count} frames"));
                    }
                }
            }
        });

        var rows = new List<double[]>();
        var hits = new List<bool>();
        var rawScores = new List<double>();
        foreach ((double[][] f, bool[] h, double[] s) in perFrame)
        {
            rows.AddRange(f);
            hits.AddRange(h);
            rawScores.AddRange(s);
        }

        if (rows.Count == 0)
        {
            throw BadInputException.At(request.Frames, 0, null, "the preset reports no lane on these frames: nothing to calibrate");
        }

        CalibrationOptions fitted = LaneCalibration.Fit(LaneFeatures.Names, rows, hits, lambda, isotonic);
        var mapping = new LaneCalibration(fitted);
        int[] used = [.. fitted.Features.Select(LaneFeatures.IndexOf)]; // the features the fit kept
        double[] after = [.. rows.Select(r => mapping.FromFeatures(used.Select(k => r[k]).ToArray()))];
        if (TablePath is not null)
        {
            WriteTable(TablePath, truth, perFrame, after);
        }

        string text = WithCalibration(baseText, fitted, request.ConfigSource, truth.Count, lambda, isotonic);
        PresetLoader.Parse(text, request.Output); // the written preset must load
        using (var file = new AtomicFile(request.Output))
        {
            file.Writer.Write(text);
            file.Commit();
        }

        return new CalibrationSummary(truth.Count, rows.Count, hits.Count(h => h), Ece(rawScores, hits), Ece(after, hits));
    }

    /// <summary>Expected calibration error of scores against outcomes (10 equal-width bins), through the scorer's own tally.</summary>
    internal static double Ece(IReadOnlyList<double> scores, IReadOnlyList<bool> hits)
    {
        var tally = new Core.Metrics.Calibration.ReliabilityTally();
        tally.Add(new FrameScore
        {
            Frame = "all",
            Tags = [],
            LaneScores = [.. scores],
            LaneHits = [.. hits],
        });
        return tally.ExpectedCalibrationError();
    }

    /// <summary>The preset text with any <c>calibration:</c> section removed and the fitted one appended.</summary>
    internal static string WithCalibration(string presetText, CalibrationOptions c, string source, int frames, double lambda, bool isotonic)
    {
        var kept = new StringBuilder(presetText.Length + 2048);
        bool inSection = false;
        foreach (string line in presetText.Replace("\r\n", "\n", StringComparison.Ordinal).Split('\n'))
        {
            bool topLevel = line.Length > 0 && !char.IsWhiteSpace(line[0]) && line[0] != '#';
            if (topLevel)
            {
                inSection = line.StartsWith("calibration:", StringComparison.Ordinal);
            }

            if (!inSection)
            {
                kept.Append(line).Append('\n');
            }
        }

        string body = kept.ToString().TrimEnd('\n') + "\n";
        var inv = CultureInfo.InvariantCulture;
        var s = new StringBuilder(body);
        s.Append("calibration:\n");
        s.Append(inv, $"  # Fitted by `lanebaseline tune --calibrate` on {frames} labelled frames ({c.FittedLanes} lanes, {c.FittedPositives} true positives at IoU 0.50);\n");
        s.Append(inv, $"  # base preset {Path.GetFileName(source)}, L2 penalty {lambda.ToString("R", inv)}, isotonic {(isotonic ? "on" : "off")}. score = isotonic(sigmoid(intercept + sum(weights * (feature - mean) / scale))).\n");
        s.Append("  features: [").Append(string.Join(", ", c.Features)).Append("]   # lane evidence features (LaneFeatures)\n");
        s.Append("  mean: ").Append(List(c.Mean)).Append("   # subtracted per feature\n");
        s.Append("  scale: ").Append(List(c.Scale)).Append("   # divided by per feature (> 0)\n");
        s.Append("  weights: ").Append(List(c.Weights)).Append("   # logistic weights\n");
        s.Append("  intercept: ").Append(c.Intercept.ToString("R", inv)).Append("   # logistic intercept\n");
        s.Append("  isotonicX: ").Append(List(c.IsotonicX)).Append("   # isotonic knots: logistic output\n");
        s.Append("  isotonicY: ").Append(List(c.IsotonicY)).Append("   # isotonic knots: probability\n");
        s.Append(inv, $"  fittedLanes: {c.FittedLanes}   # information only\n");
        s.Append(inv, $"  fittedPositives: {c.FittedPositives}   # information only\n");
        return s.ToString();
    }

    /// <summary>One CSV row per lane: frame key, lane index in the frame, 1/0 true positive at IoU 0.50, features of <see cref="LaneFeatures.All"/>, calibrated score.</summary>
    private static void WriteTable(string path, List<LaneRecord> truth, (double[][] Features, bool[] Hits, double[] RawScores)[] perFrame, double[] calibrated)
    {
        var inv = CultureInfo.InvariantCulture;
        using var file = new AtomicFile(path);
        TextWriter w = file.Writer;
        w.Write("frame,lane,hit,");
        w.Write(string.Join(',', LaneFeatures.Names));
        w.Write(",score\n");
        int row = 0;
        for (int f = 0; f < perFrame.Length; f++)
        {
            for (int l = 0; l < perFrame[f].Features.Length; l++)
            {
                w.Write(Csv(truth[f].Frame));
                w.Write(string.Create(inv, $",{l},{(perFrame[f].Hits[l] ? 1 : 0)},"));
                w.Write(string.Join(',', perFrame[f].Features[l].Select(x => x.ToString("R", inv))));
                w.Write(',');
                w.Write(calibrated[row++].ToString("R", inv));
                w.Write('\n');
            }
        }

        file.Commit();
    }

    private static string Csv(string s) => s.IndexOfAny([',', '"', '\n', '\r']) < 0 ? s : "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"";

    private static string List(double[] v) => "[" + string.Join(", ", v.Select(x => x.ToString("R", CultureInfo.InvariantCulture))) + "]";

    private static bool IsName(string nameOrPath) => nameOrPath.IndexOfAny(['/', '\\', '.']) < 0;

    private static (double[][] Features, bool[] Hits, double[] RawScores) Measure(LanePipeline pipeline, FrameScorer scorer, FrameItem item, LaneRecord truth)
    {
        Mat frame;
        try
        {
            frame = FrameLoader.Load(item.Path!, KnownPresets.Default.Limits);
        }
        catch (OpenCVException ex)
        {
            throw BadInputException.At(item.Path ?? item.Key, 0, null, ex.Message);
        }

        using (frame)
        {
            if (frame.Cols != truth.Width || frame.Rows != truth.Height)
            {
                throw BadInputException.At(item.Path ?? item.Key, 0, null, string.Create(CultureInfo.InvariantCulture, $"image size {frame.Cols}x{frame.Rows} differs from the truth's {truth.Width}x{truth.Height}"));
            }

            pipeline.ResetSequence();
            FrameResult result = pipeline.Process(frame, 0);
            Lane[] lanes = [.. result.Lanes];
            var features = new double[lanes.Length][];
            var scores = new double[lanes.Length];
            for (int i = 0; i < lanes.Length; i++)
            {
                LaneEstimate e = pipeline.Workspace!.GetLane(i);
                features[i] = LaneFeatures.Of(e);
                scores[i] = lanes[i].Score!.Value;
            }

            FrameScore score = scorer.Score(truth, new LaneRecord { Frame = truth.Frame, Width = truth.Width, Height = truth.Height, Lanes = lanes });
            return (features, score.LaneHits, scores); // every lane carries a score, so LaneHits follows the lane order
        }
    }

}
