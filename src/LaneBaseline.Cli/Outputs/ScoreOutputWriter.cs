using System.Globalization;
using System.Text;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Core;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Reporting.Score;
using LaneBaseline.Vision.Masks;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Cli.Commands;

namespace LaneBaseline.Cli.Outputs;

/// <summary>
/// Every output of a finished score job (table on stdout, JSON, per-frame CSV, mask IoU CSV, HTML page, quality gate),
/// written the same way by <c>score</c> and by <c>merge</c> of score states, so their bytes agree.
/// </summary>
internal static class ScoreOutputWriter
{
    /// <summary>Bootstrap, table, CSV commit, JSON and gate: shared by <c>score</c> and <c>merge</c>.</summary>
    internal static int Finish(TextWriter stdout, TextWriter stderr, ScoreRequest request, IReadOnlyList<SystemScore> results, AtomicFile? csvFile, MaskIouSummary[]? maskIou = null, WorstFrameGallery.FrameCandidates? galleryFrames = null)
    {
        BootstrapResult? boot = null;
        if (request.Resamples > 0)
        {
            BootstrapSeries first = results[0].Series;
            BootstrapUnit unit = request.BootstrapUnit ?? Bootstrap.DefaultUnit(first);
            int clusters = first.ClusterCount;
            if (unit == BootstrapUnit.Sequence && clusters < 2)
            {
                stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"warning: --bootstrap-unit sequence: the {first.Clusters.Count} frames form {clusters} sequence(s); the intervals collapse to a point (use --bootstrap-unit frame)"));
            }
            else if (unit == BootstrapUnit.Sequence && request.BootstrapUnit is null)
            {
                stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"note: intervals resample whole sequences ({clusters} sequences of {first.Clusters.Count} frames); --bootstrap-unit frame resamples single frames"));
            }

            double[][][] samples = Bootstrap.Resample([.. results.Select(r => r.Series)], request.Resamples, request.Seed, request.Threads, unit);
            var intervals = samples.Select(sys => sys.Select(stat => Bootstrap.Percentiles(stat, 0.95)).ToArray()).ToArray();
            boot = new BootstrapResult
            {
                Resamples = request.Resamples,
                Seed = request.Seed,
                Intervals = intervals,
                Samples = samples,
                Unit = unit,
                Units = unit == BootstrapUnit.Sequence ? clusters : first.Clusters.Count,
                Clusters = clusters,
                ByTag = TagBootstrap.Compute(results, request.Resamples, request.Seed, request.Threads, unit, 0.95, stderr.WriteLine, request.BootstrapUnit is not null),
            };
        }

        GateOutcome[] gates = [.. request.Gates.Select(g => g.Evaluate(results, boot))];

        if (results.Any(r => r.Overall.AllEmpty))
        {
            stderr.WriteLine("note: no truth and no predicted lanes at all in some system's frames; by definition it scores 1.0");
        }

        ScoreTableWriter.Write(stdout, InputSpool.Display(request.TruthPath), results, request.Settings, boot);
        if (maskIou is not null)
        {
            stdout.WriteLine();
            stdout.WriteLine("Mask IoU (per truth lane id, Hungarian-assigned; unassigned count 0):");
            for (int s = 0; s < request.Systems.Count; s++)
            {
                MaskIouSummary m = maskIou[s];
                stdout.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {request.Systems[s].Name}: mean IoU {m.MeanIou:0.0000} over {m.TruthLanes} truth lanes ({m.Matched} assigned, {m.PredLanes} predicted)"));
            }
        }

        // Every output is prepared before the first is committed: the page (which reads every gallery image and can
        // fail on a bad one) is written last-but-one and the CSV and JSON are renamed into place only after it.
        using AtomicFile? jsonFile = request.JsonPath is null ? null : new AtomicFile(request.JsonPath);
        if (jsonFile is not null)
        {
            if (InputSpool.ReadStdin)
            {
                // The settings name the inputs: standard input is named '-', not its private temporary copy.
                using var buffer = new MemoryStream();
                ScoreJsonWriter.Write(buffer, results, request.Settings, boot, request.TruthPath, maskIou is null ? null : (w, s) => WriteMaskIou(w, maskIou[s]), gates.Length == 0 ? null : w => WriteGates(w, gates));
                jsonFile.Writer.Write(InputSpool.Display(Encoding.UTF8.GetString(buffer.ToArray())));
            }
            else
            {
                ScoreJsonWriter.Write(jsonFile.Stream, results, request.Settings, boot, request.TruthPath, maskIou is null ? null : (w, s) => WriteMaskIou(w, maskIou[s]), gates.Length == 0 ? null : w => WriteGates(w, gates));
            }
        }

        if (request.Report is (string reportPath, var framesDir))
        {
            // The page model comes from the results in memory (no JSON written and parsed back); the gallery uses the
            // frame scores captured by the scoring pass.
            ScoreDocument doc = ScoreDocumentBuilder.Build(results, request.Settings, boot, InputSpool.Display(request.TruthPath), InputSpool.Display);
            GalleryRequest? gallery = framesDir is null ? null : new GalleryRequest(framesDir, request.TruthPath, request.Systems, request.Threads) { Candidates = galleryFrames, Settings = request.Settings, Focus = request.Focus };
            ReportPage.Write(reportPath, doc, request.JsonPath ?? "score run (in memory)", null, gallery, DateTimeOffset.UtcNow, CancellationToken.None);
            stderr.WriteLine("score: wrote report " + reportPath);
        }

        csvFile?.Commit();
        jsonFile?.Commit();

        // Every failed gate gets its own line; the exit code says whether any failed.
        bool failed = false;
        if (request.MinF1 is double gate)
        {
            foreach (SystemScore r in results)
            {
                double f1 = r.Overall.IouF1.At(IouThreshold.Half).F1;
                if (f1 < gate)
                {
                    stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"quality gate failed: {r.System.Name} F1@0.50 = {f1:0.####} < --min-f1 {gate}"));
                    failed = true;
                }
            }
        }

        foreach (GateOutcome g in gates)
        {
            if (!g.Passed)
            {
                stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"quality gate failed: {g.Gate.Text}: {g.Explanation}"));
                failed = true;
            }
        }

        if (gates.Length > 0 && !failed)
        {
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"score: {gates.Length} gate(s) passed"));
        }

        return failed ? ExitCodes.GateFailed : ExitCodes.Success;
    }

    private static void WriteGates(System.Text.Json.Utf8JsonWriter w, GateOutcome[] gates)
    {
        w.WriteStartArray("gates");
        foreach (GateOutcome g in gates)
        {
            w.WriteStartObject();
            w.WriteString("gate", g.Gate.Text);
            w.WriteString("system", g.Gate.System);
            if (g.Gate.Base is not null)
            {
                w.WriteString("base", g.Gate.Base);
            }

            if (g.Gate.Tag is not null)
            {
                w.WriteString("tag", g.Gate.Tag);
            }

            w.WriteString("metric", g.Gate.MetricName);
            w.WriteString("operator", g.Gate.Operator);
            w.WritePropertyName("limit");
            w.WriteRawValue(ScoreJsonWriter.FormatFloat(g.Gate.Limit), skipInputValidation: true);
            w.WritePropertyName("value");
            if (double.IsFinite(g.Value))
            {
                w.WriteRawValue(ScoreJsonWriter.FormatFloat(g.Value), skipInputValidation: true);
            }
            else
            {
                w.WriteNullValue();
            }

            w.WriteBoolean("passed", g.Passed);
            w.WriteString("detail", g.Explanation);
            w.WriteEndObject();
        }

        w.WriteEndArray();
    }

    /// <summary>Header of the per-lane mask IoU CSV (<c>--mask-iou-csv</c>).</summary>
    internal static string MaskCsvHeader(int systems) => (systems > 1 ? "system," : string.Empty) + "frame,truth_id,pred_id,iou\n";

    /// <summary>One row of the per-lane mask IoU CSV.</summary>
    internal static string MaskCsvRow(IReadOnlyList<ScoredSystem> systems, int system, MaskLaneIou lane) =>
        (systems.Count > 1 ? Csv(systems[system].Name) + "," : string.Empty)
        + string.Create(CultureInfo.InvariantCulture, $"{Csv(lane.Frame)},{lane.TruthId},{lane.PredId},{lane.Iou.ToString("R", CultureInfo.InvariantCulture)}\n");

    private static void WriteMaskIou(System.Text.Json.Utf8JsonWriter w, MaskIouSummary m)
    {
        w.WriteStartObject("mask_iou");
        w.WriteNumber("frames", m.Frames);
        w.WriteNumber("truth_lanes", m.TruthLanes);
        w.WriteNumber("pred_lanes", m.PredLanes);
        w.WriteNumber("assigned", m.Matched);
        // a float at full precision like every other metric (1.0, not 1)
        w.WritePropertyName("mean_iou");
        w.WriteRawValue(ScoreJsonWriter.FormatFloat(m.MeanIou), skipInputValidation: true);
        w.WriteEndObject();
    }

    internal static void WriteCsvHeader(TextWriter csv, bool multi) => csv.Write(CsvHeader(multi));

    private static string CsvHeader(bool multi) =>
        (multi ? "system," : string.Empty) + "frame,tags" + string.Concat(MetricCatalogue.Units.SelectMany(u => u.CsvColumns).Select(c => "," + c)) + "\n";

    internal static void WriteCsvRows(TextWriter csv, IReadOnlyList<ScoredSystem> systems, int halfIndex, IReadOnlyList<FrameScore> row)
    {
        for (int s = 0; s < row.Count; s++)
        {
            FrameScore f = row[s];
            if (systems.Count > 1)
            {
                csv.Write(Csv(systems[s].Name));
                csv.Write(',');
            }

            csv.Write(Csv(f.Frame));
            csv.Write(',');
            csv.Write(Csv(string.Join(';', f.Tags)));
            foreach (IMetricUnit unit in MetricCatalogue.Units)
            {
                unit.WriteCsvCells(csv, f, halfIndex);
            }

            csv.Write('\n');
        }
    }

    private static string Csv(string value) =>
        value.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + value.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : value;
}
