using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Core.Tuning;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Cli.Commands;

/// <summary>Tune, part 3: evaluating one trial (options from the trial values, the pipeline over the samples, the objective).</summary>
internal sealed partial class TuneRunner
{
    private double Objective(IReadOnlyList<double> values, List<Sample> tuning)
    {
        long t0 = Stopwatch.GetTimestamp();
        PipelineOptions? options = Apply(values, out string? invalid);
        double score = WorstScore;
        if (options is not null)
        {
            try
            {
                score = Measure(options, tuning);
            }
            catch (Exception ex) when (ex is OpenCVException or ArgumentException or InvalidOperationException)
            {
                invalid = "the pipeline failed: " + ex.Message;
            }
        }

        notes[ValuesKey(values)] = new TrialNote(Stopwatch.GetElapsedTime(t0).TotalSeconds, invalid);
        return score;
    }

    /// <summary>Runs the pipeline over the samples in key order (tracking restarts per sequence) and returns the objective.</summary>
    private double Measure(PipelineOptions options, List<Sample> samples)
    {
        using var pipeline = new LanePipeline(options);
        using var rasterizer = new OpenCvLaneRasterizer();
        var scorer = new FrameScorer(rasterizer, new ScoreSettings());
        var tally = new ScoreTally(scorer.Thresholds);
        Sample? current = null;
        var runner = new FrameSequenceRunner(pipeline, _ => Decode(current!.Item, current.Truth));
        foreach (Sample s in samples)
        {
            current = s;
            FrameResult result = runner.Process(s.Item, s.Frame);
            var prediction = new LaneRecord
            {
                Frame = s.Item.Key,
                Width = s.Truth.Width,
                Height = s.Truth.Height,
                Lanes = result.Lanes,
            };
            tally.Add(scorer.Score(s.Truth, prediction));
        }

        return request.Objective switch
        {
            "mf1" => tally.IouF1.MeanF1,
            "accuracy" => tally.Points.Accuracy,
            _ => tally.IouF1.At(IouThreshold.Half).F1,
        };
    }

    /// <summary>The base preset with the trial's values set by key path, or null (and the reason) when invalid.</summary>
    private PipelineOptions? Apply(IReadOnlyList<double> values, out string? invalid)
    {
        YamlMappingNode root = LoadYaml(baseYaml);
        for (int k = 0; k < space.Parameters.Count; k++)
        {
            TuneParameter p = space.Parameters[k];
            var node = (YamlScalarNode)Find(root, p.Key)!;
            node.Value = FormatValue(p, values[k]);
        }

        var doc = new YamlStream(new YamlDocument(root));
        using var writer = new StringWriter(CultureInfo.InvariantCulture);
        doc.Save(writer, assignAnchors: false);
        try
        {
            invalid = null;
            return PresetLoader.Parse(writer.ToString(), "trial preset");
        }
        catch (BadInputException ex)
        {
            invalid = string.Join("; ", ex.Problems);
            return null;
        }
    }

    private static string FormatValue(TuneParameter p, double v) =>
        p.WholeNumbers ? ((long)v).ToString(CultureInfo.InvariantCulture) : v.ToString("R", CultureInfo.InvariantCulture);

    private static YamlMappingNode LoadYaml(string text)
    {
        var stream = new YamlStream();
        using var reader = new StringReader(text);
        stream.Load(reader);
        return (YamlMappingNode)stream.Documents[0].RootNode;
    }

    private static YamlNode? Find(YamlMappingNode root, string keyPath)
    {
        YamlNode current = root;
        foreach (string part in keyPath.Split('.'))
        {
            if (current is not YamlMappingNode map || !map.Children.TryGetValue(new YamlScalarNode(part), out YamlNode? next))
            {
                return null;
            }

            current = next;
        }

        return current;
    }

    private static string ValuesKey(IReadOnlyList<double> values) =>
        string.Join(",", values.Select(v => v.ToString("R", CultureInfo.InvariantCulture)));
}
