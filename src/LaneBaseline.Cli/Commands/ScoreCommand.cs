using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using System.Text;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Core;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.Coverage;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Reporting.Score;
using LaneBaseline.Vision.Masks;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Cli.Outputs;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline score</c>: lane metrics of one or several prediction files against truth.</summary>
internal static class ScoreCommand
{
    public static Command Create()
    {
        Option<string> truth = new("--truth") { Description = "Ground truth: a lane file (*.lanes.jsonl), a folder of instance-mask PNGs, or an OpenLABEL file (*.json); '-' reads standard input.", Required = true };
        Option<string[]> pred = new("--pred")
        {
            Description = "Predictions (lane file, mask folder DIR/<frame key with .png>, or OpenLABEL *.json); repeat as NAME=FILE to compare several systems on the same frames; '-' reads standard input.",
            Required = true,
            AllowMultipleArgumentsPerToken = false,
        };
        Option<string?> json = new("--json") { Description = "Write the full results as JSON to this file ('-': standard output, the table then goes to stderr)." };
        Option<string?> csv = new("--csv") { Description = "Write one row per frame (tp/fp/fn at IoU 0.50, mean matched IoU, point accuracy); '-': standard output." };
        Option<int?> laneWidth = new("--lane-width-px") { Description = "Rasterised lane width in pixels (default round(30*width/1640))." };
        Option<double?> tolerance = new("--tolerance-px") { Description = "Base point tolerance in pixels (default 20*width/1280)." };
        Option<string[]> iou = new("--iou") { Description = "Extra IoU thresholds to report, e.g. --iou 0.4 --iou 0.6 or --iou 0.4,0.6." };
        Option<int> bootstrap = new("--bootstrap") { Description = "Bootstrap resamples for 95 % intervals (0 disables).", DefaultValueFactory = _ => 1000 };
        Option<ulong> seed = new("--bootstrap-seed") { Description = "Seed of the bootstrap resampling.", DefaultValueFactory = _ => 0UL };
        Option<ulong> legacySeed = SharedOptions.Deprecated<ulong>("--seed", "--bootstrap-seed"); // until 2026-12: --seed means a scene or search seed (default 1) elsewhere
        Option<double?> minF1 = new("--min-f1") { Description = "Quality gate: exit 4 when F1@0.50 of any system is below this." };
        Option<string?> report = new("--report") { Description = "Also write the HTML report (as 'lanebaseline report') to this file." };
        Option<string> frames = SharedOptions.Frames("Folder of the frame images, for the report's worst-frame gallery (needs --report).");
        Option<int> threads = SharedOptions.Threads("Worker threads (results do not depend on it).");
        Option<string?> shard = new("--shard") { Description = "Score only shard K/N of the frames: whole sequences (frame key without its trailing number) by a stable hash, as detect and audit --shard, e.g. 0/4." };
        Option<string?> camera = new("--camera") { Description = "camera.json: also report metric-space errors (lateral error at 5/10/20/30 m, ego-lane width, curvature) on the road plane." };
        Option<string?> size = new("--size") { Description = "Frame size WxH for truth masks (default: each mask's own size); prediction masks are rescaled to the truth's size." };
        Option<int> minMaskRows = new("--min-mask-rows") { Description = "Fewest mask rows a lane id must cover to become a lane.", DefaultValueFactory = _ => 10 };
        Option<string?> maskCsv = new("--mask-iou-csv") { Description = "With truth and predictions both mask folders: write per-lane mask IoU rows to this file." };
        Option<string?> partial = new("--partial") { Description = "Write this shard's sufficient statistics to a state file for 'merge' (instead of final results)." };
        Option<string> missing = new("--missing") { Description = "Truth frames without a prediction record: 'empty' scores them as predicting no lanes (with a warning), 'error' exits 3.", DefaultValueFactory = _ => "empty" };
        missing.AcceptOnlyFromAmong("empty", "error");
        Option<string> extra = new("--extra") { Description = "Prediction records of frames the truth lacks: 'ignore' leaves them out (with a warning), 'error' exits 3.", DefaultValueFactory = _ => "ignore" };
        extra.AcceptOnlyFromAmong("ignore", "error");
        Option<string?> bootstrapUnit = new("--bootstrap-unit") { Description = "What the bootstrap resamples: 'sequence' (whole sequences, the key without its trailing frame number; the default when the keys have sequences) or 'frame'." };
        bootstrapUnit.AcceptOnlyFromAmong("sequence", "frame");
        Option<string[]> gates = new("--gate")
        {
            Description = "Quality gate, repeatable: SYSTEM:METRIC>=VALUE, SYSTEM:TAG:METRIC>=VALUE or diff(SYSTEM,BASE):METRIC>=VALUE (lower bound of the paired 95 % interval); METRIC f1@T, mf1, precision@T, recall@T or accuracy. Exit 4 when any fails.",
            AllowMultipleArgumentsPerToken = false,
        };
        Option<string?> focus = new("--focus") { Description = "With --report --frames: tag galleries for this system only (default: every system)." };

        Command command = new("score", "Score predicted lanes against ground truth: IoU F1 at thresholds, mF1, point accuracy, per-tag breakdown, bootstrap intervals.")
        {
            truth, pred, json, csv, laneWidth, tolerance, iou, bootstrap, seed, minF1, report, frames, threads, shard, partial, camera, size, minMaskRows, maskCsv,
            missing, extra, bootstrapUnit, gates, focus, legacySeed,
            SettingsFile.Option(),
        };

        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            OutputPaths.Check(
                [("--truth", parseResult.GetValue(truth)), .. OutputPaths.Preds(parseResult.GetValue(pred)), ("--camera", parseResult.GetValue(camera))],
                [("--json", parseResult.GetValue(json)), ("--csv", parseResult.GetValue(csv)), ("--report", parseResult.GetValue(report)), ("--partial", parseResult.GetValue(partial)), ("--mask-iou-csv", parseResult.GetValue(maskCsv))]);
            OutputPaths.Check([], [("--report (its gallery folder)", OutputPaths.GalleryFolder(parseResult.GetValue(report), parseResult.GetValue(frames)))], outputsAreFiles: false);
            var settings = new ScoreSettings
            {
                LaneWidthPx = parseResult.GetValue(laneWidth),
                TolerancePx = parseResult.GetValue(tolerance),
                ExtraThresholds = CommandArguments.ParseThresholds(parseResult.GetValue(iou) ?? []),
                Camera = parseResult.GetValue(camera) is string cameraPath ? CameraModel.Load(cameraPath) : null,
            };
            if (settings.LaneWidthPx is <= 0 or > ScoreSettings.MaxLaneWidthPx)
            {
                throw new UsageException($"--lane-width-px must be a whole number from 1 to {ScoreSettings.MaxLaneWidthPx}");
            }

            if (settings.TolerancePx is double tp && (!(tp > 0) || !double.IsFinite(tp)))
            {
                throw new UsageException("--tolerance-px must be a positive number");
            }

            int resamples = parseResult.GetValue(bootstrap);
            if (resamples is < 0 or > ScoreSettings.MaxBootstrapResamples)
            {
                throw new UsageException($"--bootstrap must be from 0 to {ScoreSettings.MaxBootstrapResamples} resamples");
            }

            int threadCount = SharedOptions.CheckThreads(parseResult.GetValue(threads));

            double? gate = parseResult.GetValue(minF1);
            if (gate is double g && (g < 0 || g > 1 || double.IsNaN(g)))
            {
                throw new UsageException("--min-f1 must be in [0, 1]");
            }

            string? reportPath = parseResult.GetValue(report);
            string? framesDir = parseResult.GetValue(frames);
            if (framesDir is not null && reportPath is null)
            {
                throw new UsageException("--frames draws the report's gallery and needs --report");
            }

            ShardSpec? shardSpec = LaneInputs.ParseShard(parseResult.GetValue(shard));
            IReadOnlyList<ScoredSystem> systems = CommandArguments.ParseSystems(parseResult.GetRequiredValue(pred), stdin: true);
            IReadOnlyList<ScoreGate> gateList = ParseGates(parseResult.GetValue(gates) ?? [], systems, resamples);
            IouThreshold[] gateThresholds = [.. gateList.Where(g => g.UsesThreshold).Select(g => g.Threshold).Where(t => !settings.Thresholds.Contains(t))];
            if (gateThresholds.Length > 0)
            {
                // a gate on f1@0.40 needs that threshold scored: it is added like an --iou extra
                settings = settings with { ExtraThresholds = [.. settings.ExtraThresholds, .. gateThresholds.Distinct()] };
            }

            string? focusName = parseResult.GetValue(focus);
            if (focusName is not null && systems.All(s => s.Name != focusName))
            {
                throw new UsageException($"--focus {focusName}: no system of that name (systems: {string.Join(", ", systems.Select(s => s.Name))})");
            }

            var request = new ScoreRequest(
                InputSpool.Input(parseResult.GetRequiredValue(truth)),
                systems,
                settings,
                resamples,
                SharedOptions.GetRenamed(parseResult, seed, legacySeed, stderr),
                threadCount,
                parseResult.GetValue(json),
                parseResult.GetValue(csv),
                gate)
            {
                Report = reportPath is null ? null : (reportPath, framesDir),
                BootstrapUnit = parseResult.GetValue(bootstrapUnit) switch
                {
                    "sequence" => Core.Metrics.BootstrapUnit.Sequence,
                    "frame" => Core.Metrics.BootstrapUnit.Frame,
                    _ => null,
                },
                Gates = gateList,
                Focus = focusName,
                Missing = parseResult.GetValue(missing) == "error" ? MissingFramePolicy.Error : MissingFramePolicy.Empty,
                Extra = parseResult.GetValue(extra) == "error" ? ExtraFramePolicy.Error : ExtraFramePolicy.Ignore,
            };
            int maskRows = parseResult.GetValue(minMaskRows);
            if (maskRows < 2)
            {
                throw new UsageException("--min-mask-rows must be at least 2");
            }

            var masks = new MaskInputs(LaneInputs.ParseSize(parseResult.GetValue(size), "--size"), maskRows, parseResult.GetValue(maskCsv));
            string? partialPath = parseResult.GetValue(partial);
            if (partialPath is not null && masks.CsvPath is not null)
            {
                throw new UsageException("--partial writes a state for 'merge'; give --mask-iou-csv to merge instead");
            }


            return partialPath is null
                ? Execute(stdout, stderr, request, shardSpec, masks, cancellationToken)
                : WritePartial(stderr, request, shardSpec ?? new ShardSpec(0, 1), partialPath, masks, cancellationToken);
        })));
        return command;
    }

    private static int Execute(TextWriter stdout, TextWriter stderr, ScoreRequest request, ShardSpec? shard, MaskInputs masks, CancellationToken cancellationToken)
    {
        bool allMasks = shard is null && LaneInputs.IsMaskFolder(request.TruthPath) && request.Systems.All(s => LaneInputs.IsMaskFolder(s.Path));
        if (masks.CsvPath is not null && !allMasks)
        {
            throw new UsageException("--mask-iou-csv needs --truth and every --pred to be mask folders (and no --shard)");
        }

        var clock = Stopwatch.StartNew();
        using AtomicFile? csvFile = request.CsvPath is null ? null : new AtomicFile(request.CsvPath);
        TextWriter? csvWriter = csvFile?.Writer;
        if (csvWriter is not null)
        {
            ScoreOutputWriter.WriteCsvHeader(csvWriter, request.Systems.Count > 1);
        }
        using var progress = new ProgressDisplay("score", "frames", stderr);
        int halfIndex = request.Settings.HalfIndex;

        // score --report --frames: the gallery's candidates are captured from this run's frame scores (no second pass).
        WorstFrameGallery.FrameCandidates? galleryFrames = shard is null && request.Report is (_, string)
            ? new WorstFrameGallery.FrameCandidates(request.Systems.Count, halfIndex)
            : null;
        var run = new ScoreRun(request.TruthPath, request.Systems, request.Settings)
        {
            OnNote = message => stderr.WriteLine("note: " + message),
            OnWarning = message => stderr.WriteLine("warning: " + message),
            Missing = request.Missing,
            Extra = request.Extra,
            Threads = request.Threads,
            Shard = shard,
            Opener = LaneInputs.Opener(masks.Size, masks.MinRows, stderr),
            OnFrame = csvWriter is null && galleryFrames is null ? null : row =>
            {
                if (csvWriter is not null)
                {
                    ScoreOutputWriter.WriteCsvRows(csvWriter, request.Systems, halfIndex, row);
                }

                galleryFrames?.Add(row);
            },
            OnProgress = (done, total) => progress.Report(done, total),
        };
        IReadOnlyList<SystemScore> results = run.Execute(CreateRasterizer, cancellationToken);
        progress.Finish();
        double scoreSeconds = clock.Elapsed.TotalSeconds;
        long frames = results[0].Overall.Frames;
        stderr.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"score: {frames} frames x {results.Count} system(s) in {scoreSeconds:0.###} s ({frames * results.Count / Math.Max(scoreSeconds, 1e-9):0} frame-scores/s, {request.Threads} thread(s))"));
        MaskIouSummary[]? maskIou = allMasks ? MaskIouAll(request.TruthPath, request.Systems, masks.CsvPath, cancellationToken) : null;
        return ScoreOutputWriter.Finish(stdout, stderr, request, results, csvFile, maskIou, galleryFrames);
    }

    private static int WritePartial(TextWriter stderr, ScoreRequest request, ShardSpec shard, string partialPath, MaskInputs masks, CancellationToken cancellationToken)
    {
        if (request.JsonPath is not null || request.CsvPath is not null || request.MinF1 is not null || request.Report is not null || request.Gates.Count > 0)
        {
            throw new UsageException("--partial writes a state for 'merge'; give --json, --csv and --min-f1 to merge instead");
        }

        var clock = Stopwatch.StartNew();
        long frames;
        bool maskIou = LaneInputs.IsMaskFolder(request.TruthPath) && request.Systems.All(s => LaneInputs.IsMaskFolder(s.Path));
        using var file = new AtomicFile(partialPath);
        ScoreStateWriter? writer = null;
        int truthFrames = 0;
        try
        {
            ScoreRun? self = null;
            IReadOnlyList<FrameCoverage>? coverageOf() => self?.Coverage;
            var run = new ScoreRun(request.TruthPath, request.Systems, request.Settings)
            {
                OnNote = message => stderr.WriteLine("note: " + message),
                OnWarning = message => stderr.WriteLine("warning: " + message),
                Missing = request.Missing,
                Extra = request.Extra,
                Threads = request.Threads,
                Shard = shard,
                Opener = LaneInputs.Opener(masks.Size, masks.MinRows, stderr),
                OnValidated = n =>
                {
                    truthFrames = n;
#pragma warning disable IDISP004, IDISP003 // called once; NonClosingStream only forwards to the AtomicFile's stream
                    writer = new ScoreStateWriter(new NonClosingStream(file.Stream), new ScoreStateHeader
                    {
                        Shard = shard,
                        Truth = request.TruthPath,
                        TruthFrames = n,
                        Systems = request.Systems,
                        Settings = request.Settings,
                        Resamples = request.Resamples,
                        Seed = request.Seed,
                        MaskIou = maskIou,
                        InputHashes = [ContentHash.Of(request.TruthPath), .. request.Systems.Select(s => ContentHash.Of(s.Path))],
                        Coverage = coverageOf(),
                        Unit = request.BootstrapUnit,
                    });
#pragma warning restore IDISP004, IDISP003
                },
                OnFrame = row => writer!.Write(row),
            };
            self = run;
            frames = run.Execute(CreateRasterizer, cancellationToken)[0].Overall.Frames;
            if (maskIou)
            {
                // Mask IoU of this shard's frames, after the frame lines; merge replays it in the unsharded order.
                for (int sys = 0; sys < request.Systems.Count; sys++)
                {
                    int system = sys;
                    MaskIouRun.Execute(
                        request.TruthPath,
                        request.Systems[sys].Path,
                        null,
                        include: shard.Contains,
                        onFrame: (rel, predLanes, lanes) => writer!.WriteMask(new MaskFrameState(system, rel, predLanes, [.. lanes.Select(l => new MaskLaneState(l.TruthId, l.PredId, l.Iou))])),
                        cancellationToken: cancellationToken);
                }
            }
        }
        finally
        {
            writer?.Dispose();
        }

        file.Commit();
        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"score: shard {shard}: {frames} of {truthFrames} frames in {clock.Elapsed.TotalSeconds:0.###} s -> {partialPath}"));
        return ExitCodes.Success;
    }

    private static MaskIouSummary[] MaskIouAll(string truthPath, IReadOnlyList<ScoredSystem> systems, string? csvPath, CancellationToken cancellationToken)
    {
        using AtomicFile? csvFile = csvPath is null ? null : new AtomicFile(csvPath);
        TextWriter? csv = csvFile?.Writer;
        csv?.Write(ScoreOutputWriter.MaskCsvHeader(systems.Count));
        var result = new MaskIouSummary[systems.Count];
        for (int s = 0; s < systems.Count; s++)
        {
            int system = s;
            result[s] = MaskIouRun.Execute(
                truthPath,
                systems[s].Path,
                csv is null ? null : lane => csv.Write(ScoreOutputWriter.MaskCsvRow(systems, system, lane)),
                cancellationToken: cancellationToken);
        }

        csvFile?.Commit();
        return result;
    }

    /// <summary>Parses every --gate; a malformed gate or an unknown system is a usage error (exit 2).</summary>
    internal static IReadOnlyList<ScoreGate> ParseGates(string[] texts, IReadOnlyList<ScoredSystem> systems, int resamples)
    {
        var list = new List<ScoreGate>();
        foreach (string text in texts)
        {
            ScoreGate g;
            try
            {
                g = ScoreGate.Parse(text);
            }
            catch (FormatException ex)
            {
                throw new UsageException("--gate " + ex.Message);
            }

            foreach (string name in g.Base is null ? [g.System] : new[] { g.System, g.Base })
            {
                if (systems.All(s => s.Name != name))
                {
                    throw new UsageException($"--gate '{text}': no system named '{name}' (systems: {string.Join(", ", systems.Select(s => s.Name))})");
                }
            }

            if (g.IsPaired && g.System == g.Base)
            {
                throw new UsageException($"--gate '{text}': diff( ) compares two different systems");
            }

            if (g.IsPaired && resamples == 0)
            {
                throw new UsageException($"--gate '{text}': a paired gate reads the bootstrap interval; --bootstrap 0 turns it off");
            }

            list.Add(g);
        }

        return list;
    }

#pragma warning disable IDISP005 // ScoreRun owns and disposes the rasterizers it creates
    private static ILaneRasterizer CreateRasterizer() => new OpenCvLaneRasterizer();
#pragma warning restore IDISP005

}
