using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Core;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Reporting.Audit;
using LaneBaseline.Vision.Audit;
using LaneBaseline.Vision.Masks;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;
using LaneBaseline.Cli.Outputs;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline audit</c>: sanity-check predicted lanes without truth.</summary>
internal static class AuditCommand
{
    public static Command Create()
    {
        Option<string> pred = new("--pred") { Description = "Lanes to audit: a lane file, a mask folder or an OpenLABEL file ('-': standard input).", Required = true };
        Option<string?> baseline = new("--baseline") { Description = "The classical baseline's lanes on the same frames; frames where they disagree are ranked for labelling." };
        Option<string> output = SharedOptions.Output("Findings file (JSON Lines, ranked worst frame first; '-': standard output); required unless --partial is given.");
        Option<string> legacyOut = SharedOptions.LegacyOut();
        Option<string> frames = SharedOptions.Frames("Frames root: overlays are drawn on FRAMES/<frame key> when it exists.");
        Option<string?> size = new("--size") { Description = "Frame size WxH for records without one." };
        Option<double?> horizon = new("--horizon-row") { Description = "Horizon row in pixels (default: estimated per frame from the lanes' vanishing point)." };
        Option<double> fps = new("--fps") { Description = "Frame rate of numbered sequences (temporal rules).", DefaultValueFactory = _ => 10.0 };
        Option<bool> stills = new("--stills") { Description = "The frames are independent stills (not sequences): the temporal rules (LBA-T) are off, and the summary says so." };
        Option<string?> summaryJson = new("--summary-json") { Description = "Also write the per-rule summary (findings, frames, limit, whether the rule ran) as JSON to this file." };
        Option<int> overlays = new("--overlay-count") { Description = "Draw the N worst frames to OUT.overlays/.", DefaultValueFactory = _ => 0 };
        Option<int> legacyOverlays = SharedOptions.Deprecated<int>("--overlays", "--overlay-count"); // until 2026-12: --overlays names a folder on detect and render
        Option<int> mine = new("--mine") { Description = "Write the N frames most worth labelling to OUT.mine.txt (by disagreement with --baseline, else by findings).", DefaultValueFactory = _ => 0 };
        Option<string> failOn = new("--fail-on") { Description = "Quality gate: exit 4 when a finding of this severity or worse exists (none, warning, error).", DefaultValueFactory = _ => "none" };
        Option<int> minMaskRows = new("--min-mask-rows") { Description = "Fewest mask rows a lane id must cover to become a lane.", DefaultValueFactory = _ => 10 };
        Option<string?> camera = new("--camera") { Description = "camera.json of the frames: enables the ground-geometry rules (lane width, curve radius, parallelism) and fixes the horizon row." };
        Option<double> speed = new("--design-speed-kmh") { Description = "Design speed for the curve-radius rule, R = V^2 / (127 (e + f)) with e 0.08, f 0.12.", DefaultValueFactory = _ => 100.0 };
        Option<string?> report = new("--report") { Description = "Also write a self-contained HTML page of the findings (per rule and the first findings)." };
        Option<string?> generatedAt = new("--generated-at") { Description = "Time printed as 'generated' in the --report page (ISO 8601), for reproducible pages; default now." };
        Option<int> threads = SharedOptions.Threads("Worker threads (results do not depend on it).");
        Option<string?> shard = new("--shard") { Description = "Audit only shard K/N: whole sequences (frame key without its trailing number) by a stable hash, e.g. 0/4." };
        Option<string?> partial = new("--partial") { Description = "Write this shard's findings and frame scores to a state file for 'merge' (instead of the findings file)." };

        Command command = new("audit", "Sanity-check predicted lanes without truth: image geometry, temporal consistency, disagreement with the baseline. Writes ranked findings, a summary table, overlays of the worst frames and a labelling list.")
        {
            pred, baseline, output, frames, size, horizon, camera, speed, fps, overlays, mine, failOn, minMaskRows, report, generatedAt, threads, shard, partial, stills, summaryJson, legacyOverlays,
            SettingsFile.Option(),
        };
        SharedOptions.AddOutput(command, output, legacyOut, required: false);
        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            AuditSeverity? gateSeverity = CommandArguments.ParseGate(parseResult.GetValue(failOn)!);
            int threadCount = SharedOptions.CheckThreads(parseResult.GetValue(threads));

            double rate = parseResult.GetValue(fps);
            if (!(rate > 0) || !double.IsFinite(rate))
            {
                throw new UsageException("--fps must be a positive number");
            }

            int n = SharedOptions.GetRenamed(parseResult, overlays, legacyOverlays, stderr), m = parseResult.GetValue(mine), rows = parseResult.GetValue(minMaskRows);
            if (n < 0 || m < 0)
            {
                throw new UsageException("--overlay-count and --mine must be 0 or more");
            }

            if (rows < 2)
            {
                throw new UsageException("--min-mask-rows must be at least 2");
            }

            double designSpeed = parseResult.GetValue(speed);
            if (!(designSpeed > 0) || !double.IsFinite(designSpeed))
            {
                throw new UsageException("--design-speed-kmh must be a positive number");
            }

            string? outPath = SharedOptions.GetOutput(parseResult, output, legacyOut, stderr), partialPath = parseResult.GetValue(partial), reportPath = parseResult.GetValue(report);
            ShardSpec? shardSpec = LaneInputs.ParseShard(parseResult.GetValue(shard));
            if (partialPath is not null)
            {
                if (outPath is not null || n > 0 || m > 0 || gateSeverity is not null || reportPath is not null || parseResult.GetValue(summaryJson) is not null)
                {
                    throw new UsageException("--partial writes a state for 'merge': give -o, --overlay-count, --mine, --fail-on and --report to merge instead");
                }
            }
            else if (outPath is null)
            {
                throw new UsageException("give -o FINDINGS.jsonl (or --partial STATE with --shard)");
            }
            else if (StandardStreams.IsDash(outPath) && (n > 0 || m > 0 || reportPath is not null))
            {
                throw new UsageException("--overlay-count, --mine and --report are written beside the findings file; give -o FILE instead of -o -");
            }

            string? cameraPath = parseResult.GetValue(camera), sizeText = parseResult.GetValue(size);
            string? findingsStem = outPath is null ? null : outPath.EndsWith(".jsonl", StringComparison.OrdinalIgnoreCase) ? outPath[..^6] : outPath;
            OutputPaths.Check(
                [("--pred", parseResult.GetValue(pred)), ("--baseline", parseResult.GetValue(baseline)), ("--camera", cameraPath)],
                [("-o", outPath), ("--partial", partialPath), ("--report", reportPath), ("--mine", m > 0 ? findingsStem + ".mine.txt" : null)]);
            OutputPaths.Check([], [("--overlay-count (its folder)", n > 0 ? findingsStem + ".overlays" : null)], outputsAreFiles: false);
            var settings = new AuditSettings
            {
                Camera = cameraPath is null ? null : CameraModel.Load(cameraPath),
                DesignSpeedKmh = designSpeed,
                Size = LaneInputs.ParseSize(sizeText, "--size"),
                HorizonRow = parseResult.GetValue(horizon),
                FramesPerSecond = rate,
                Stills = parseResult.GetValue(stills),
            };
            string predPath = InputSpool.Input(parseResult.GetRequiredValue(pred));
            string? baselinePath = parseResult.GetValue(baseline) is string b ? InputSpool.Input(b) : null;
            var job = new AuditJob { Pred = predPath, Baseline = baselinePath, MinMaskRows = rows, Settings = settings };
            DateTimeOffset at = ReportPage.ParseGeneratedAt(parseResult.GetValue(generatedAt));
            var clock = Stopwatch.StartNew();
            LaneSourceOpener opener = LaneInputs.Opener(settings.Size, rows, stderr);
            AuditResult result = Run(stderr, predPath, baselinePath, settings, opener, shardSpec, threadCount, cancellationToken);
            int exit;
            if (partialPath is not null)
            {
                var header = new AuditStateHeader
                {
                    Shard = shardSpec ?? new ShardSpec(0, 1),
                    Job = job with
                    {
                        PredSha256 = ContentHash.Of(predPath),
                        BaselineSha256 = baselinePath is null ? null : ContentHash.Of(baselinePath),
                    },
                    InputFrames = result.InputFrames,
                    Frames = result.Frames,
                    ComparedFrames = result.ComparedFrames,
                };
                using (var state = new AtomicFile(partialPath))
                {
                    AuditStateWriter.Write(state.Stream, header, result);
                    state.Commit();
                }

                stdout.WriteLine(F($"Audited shard {header.Shard}: {result.Frames} of {result.InputFrames} frames, {result.Findings.Count} findings -> {partialPath} (join the shards with 'lanebaseline merge')"));
                exit = ExitCodes.Success;
            }
            else
            {
                var outputs = new AuditOutputs(outPath!, parseResult.GetValue(frames), n, m, gateSeverity, reportPath is null ? null : (reportPath, at))
                {
                    SummaryJson = parseResult.GetValue(summaryJson),
                };
                exit = AuditOutputWriter.Finish(stdout, stderr, result, outputs, job, opener, cancellationToken);
            }

            stderr.WriteLine(F($"audit: {result.Frames} frames in {clock.Elapsed.TotalSeconds:0.###} s ({threadCount} thread(s))"));
            return exit;
        })));
        return command;
    }

    private static AuditResult Run(
        TextWriter stderr,
        string predPath,
        string? baselinePath,
        AuditSettings settings,
        LaneSourceOpener opener,
        ShardSpec? shard,
        int threads,
        CancellationToken cancellationToken)
    {
        using var progress = new ProgressDisplay("audit", "frames", stderr);
        var run = new AuditRun(settings)
        {
            Threads = threads,
            Opener = opener,
            Shard = shard,
            OnProgress = done => progress.Report(done),
        };
        return run.Execute(predPath, baselinePath, CreateRasterizer, cancellationToken);
    }

#pragma warning disable IDISP005 // AuditRun owns and disposes the rasterizers it creates
    private static ILaneRasterizer CreateRasterizer() => new OpenCvLaneRasterizer();
#pragma warning restore IDISP005

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
