using System.CommandLine;
using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Vision.Masks;
using LaneBaseline.Cli.Outputs;

namespace LaneBaseline.Cli.Commands;

/// <summary>
/// <c>lanebaseline merge</c>: joins the outputs of sharded runs into what one unsharded run writes — partial score
/// states (from <c>score --partial</c>) into the score JSON/CSV/table, partial audit states (from
/// <c>audit --partial</c>) into the findings, labelling list, page and summary, or lane files (from
/// <c>detect --shard</c>) into one lane file, byte for byte.
/// </summary>
internal static class MergeCommand
{
    public static Command Create()
    {
        Argument<string[]> inputs = new("inputs") { Description = "Score states, audit states or lane files of every shard (one kind).", Arity = ArgumentArity.OneOrMore };
        Option<string> output = SharedOptions.Output("Merged score JSON (score states), findings file (audit states) or lane file (lane files); '-': standard output.");
        output.Required = true;
        Option<string?> csv = new("--csv") { Description = "Score states only: also write the per-frame CSV." };
        Option<string?> maskCsv = new("--mask-iou-csv") { Description = "Score states of mask folders only: also write the per-lane mask IoU CSV." };
        Option<double?> minF1 = new("--min-f1") { Description = "Score states only: quality gate, exit 4 when F1@0.50 is below this." };
        Option<int> threads = SharedOptions.Threads("Threads for the bootstrap (results do not depend on it).");
        Option<int> mine = new("--mine") { Description = "Audit states only: also write the N frames most worth labelling to OUT.mine.txt.", DefaultValueFactory = _ => 0 };
        Option<int> overlays = new("--overlay-count") { Description = "Audit states only: draw the N worst frames to OUT.overlays/ (reads the predictions named in the states).", DefaultValueFactory = _ => 0 };
        Option<int> legacyOverlays = SharedOptions.Deprecated<int>("--overlays", "--overlay-count"); // until 2026-12
        Option<string> frames = SharedOptions.Frames("Audit states only: frames root for --overlay-count.");
        Option<string> failOn = new("--fail-on") { Description = "Audit states only: exit 4 when a finding of this severity or worse exists (none, warning, error).", DefaultValueFactory = _ => "none" };
        Option<string?> report = new("--report") { Description = "Audit states only: also write the findings page (HTML)." };
        Option<string?> generatedAt = new("--generated-at") { Description = "Audit states only: time printed in the --report page (ISO 8601)." };
        Option<string?> summaryJson = new("--summary-json") { Description = "Audit states only: also write the per-rule summary as JSON to this file (as audit --summary-json)." };

        Command command = new("merge", "Join the outputs of sharded runs (score states, audit states or lane files) into the output of one unsharded run.")
        {
            inputs, output, csv, maskCsv, minF1, threads, mine, overlays, frames, failOn, report, generatedAt, summaryJson, legacyOverlays,
        };
        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            string[] paths = parseResult.GetRequiredValue(inputs);
            string outPath = parseResult.GetRequiredValue(output);
            int threadCount = SharedOptions.CheckThreads(parseResult.GetValue(threads));
            int overlayCount = SharedOptions.GetRenamed(parseResult, overlays, legacyOverlays, stderr);
            string outStem = outPath.EndsWith(".jsonl", StringComparison.OrdinalIgnoreCase) ? outPath[..^6] : outPath;
            OutputPaths.Check(
                [.. paths.Select(p => ("input", (string?)p))],
                [("-o", outPath), ("--csv", parseResult.GetValue(csv)), ("--mask-iou-csv", parseResult.GetValue(maskCsv)), ("--report", parseResult.GetValue(report)), ("--summary-json", parseResult.GetValue(summaryJson)), ("--mine", parseResult.GetValue(mine) > 0 ? outStem + ".mine.txt" : null)]);
            OutputPaths.Check([], [("--overlay-count (its folder)", overlayCount > 0 ? outStem + ".overlays" : null)], outputsAreFiles: false);
            InputKind[] kinds = [.. paths.Select(KindOf)];
            if (kinds.Distinct().Count() > 1)
            {
                throw new UsageException("merge: give inputs of one kind (score states, audit states or lane files), not a mix");
            }

            bool auditOptions = parseResult.GetValue(mine) != 0 || overlayCount != 0 || parseResult.GetValue(frames) is not null
                || parseResult.GetValue(failOn) != "none" || parseResult.GetValue(report) is not null || parseResult.GetValue(generatedAt) is not null
                || parseResult.GetValue(summaryJson) is not null;
            if (kinds[0] != InputKind.AuditState && auditOptions)
            {
                throw new UsageException("--mine, --overlay-count, --frames, --fail-on, --report, --generated-at and --summary-json apply to audit states only");
            }

            if (kinds[0] == InputKind.AuditState)
            {
                if (parseResult.GetValue(csv) is not null || parseResult.GetValue(minF1) is not null || parseResult.GetValue(maskCsv) is not null)
                {
                    throw new UsageException("--csv, --mask-iou-csv and --min-f1 apply to score states only");
                }

                return MergeAudit(stdout, stderr, paths, outPath, parseResult.GetValue(mine), overlayCount, parseResult.GetValue(frames), parseResult.GetValue(failOn)!, parseResult.GetValue(report), parseResult.GetValue(generatedAt), parseResult.GetValue(summaryJson), cancellationToken);
            }

            if (kinds[0] == InputKind.ScoreState)
            {
                using AtomicFile? csvFile = parseResult.GetValue(csv) is string c ? new AtomicFile(c) : null;
                using AtomicFile? maskCsvFile = parseResult.GetValue(maskCsv) is string mc ? new AtomicFile(mc) : null;
                TextWriter? csvWriter = csvFile?.Writer;
                int halfIndex = -1;
                IReadOnlyList<ScoredSystem>? systems = null;
                MaskIouSummary[]? maskIou = null;
                (ScoreStateHeader header, SystemScore[] results) = ScoreStateMerge.Merge(
                    paths,
                    h =>
                    {
                        systems = h.Systems;
                        halfIndex = h.Settings.HalfIndex;
                        if (csvWriter is not null)
                        {
                            ScoreOutputWriter.WriteCsvHeader(csvWriter, h.Systems.Count > 1);
                        }

                        if (h.MaskIou)
                        {
                            maskIou = [.. h.Systems.Select(_ => new MaskIouSummary())];
                            maskCsvFile?.Writer.Write(ScoreOutputWriter.MaskCsvHeader(h.Systems.Count));
                        }
                        else if (maskCsvFile is not null)
                        {
                            throw new UsageException("--mask-iou-csv: these states carry no mask IoU (truth and predictions were not all mask folders)");
                        }
                    },
                    row =>
                    {
                        if (csvWriter is not null)
                        {
                            ScoreOutputWriter.WriteCsvRows(csvWriter, systems!, halfIndex, row);
                        }
                    },
                    mask =>
                    {
                        MaskLaneIou[] lanes = [.. mask.Lanes.Select(l => new MaskLaneIou(mask.Frame, l.TruthId, l.PredId, l.Iou))];
                        maskIou![mask.System].AddFrame(mask.PredLanes, lanes);
                        foreach (MaskLaneIou lane in lanes)
                        {
                            maskCsvFile?.Writer.Write(ScoreOutputWriter.MaskCsvRow(systems!, mask.System, lane));
                        }
                    });
                maskCsvFile?.Commit();
                stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"merge: {results[0].Overall.Frames} frames from {paths.Length} shard state(s)"));
                var request = new ScoreRequest(header.Truth, header.Systems, header.Settings, header.Resamples, header.Seed, threadCount, outPath, csvFile is null ? null : "csv", parseResult.GetValue(minF1))
                {
                    BootstrapUnit = header.Unit,
                };
                return ScoreOutputWriter.Finish(stdout, stderr, request, results, csvFile, maskIou);
            }

            if (parseResult.GetValue(csv) is not null || parseResult.GetValue(minF1) is not null || parseResult.GetValue(maskCsv) is not null)
            {
                throw new UsageException("--csv, --mask-iou-csv and --min-f1 apply to score states only");
            }

            using var file = new AtomicFile(outPath);
            long n = LaneFileMerge.Merge(paths, file.Stream);
            file.Commit();
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"merge: {n} records from {paths.Length} file(s) -> {outPath}"));
            return ExitCodes.Success;
        })));
        return command;
    }

    private enum InputKind
    {
        LaneFile,
        ScoreState,
        AuditState,
    }

    private static InputKind KindOf(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, Directory.Exists(path) ? "is a directory" : "file not found");
        }

        using var stream = File.OpenRead(InputSpool.ReadablePath(path));
        var head = new byte[256]; // the format key follows "tool" in the header
        int n = stream.Read(head, 0, head.Length);
        ReadOnlySpan<byte> span = head.AsSpan(0, n);
        return span.IndexOf("\"format\":\"lanebaseline-score-state\""u8) >= 0 ? InputKind.ScoreState
            : span.IndexOf("\"format\":\"lanebaseline-audit-state\""u8) >= 0 ? InputKind.AuditState
            : InputKind.LaneFile;
    }

    private static int MergeAudit(
        TextWriter stdout,
        TextWriter stderr,
        string[] paths,
        string outPath,
        int mine,
        int overlays,
        string? framesRoot,
        string failOn,
        string? reportPath,
        string? generatedAt,
        string? summaryJson,
        CancellationToken cancellationToken)
    {
        AuditSeverity? gate = CommandArguments.ParseGate(failOn);
        if (mine < 0 || overlays < 0)
        {
            throw new UsageException("--overlay-count and --mine must be 0 or more");
        }

        if (StandardStreams.IsDash(outPath) && (mine > 0 || overlays > 0 || reportPath is not null))
        {
            throw new UsageException("--overlay-count, --mine and --report are written beside the findings file; give -o FILE instead of -o -");
        }

        DateTimeOffset at = Reports.ReportPage.ParseGeneratedAt(generatedAt);
        (AuditStateHeader header, AuditResult result) = AuditStateMerge.Merge(paths);
        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"merge: {result.Frames} audited frames from {paths.Length} shard state(s)"));
        AuditJob job = header.Job;
        LaneSourceOpener opener = LaneInputs.Opener(job.Settings.Size, job.MinMaskRows, stderr);
        var outputs = new AuditOutputs(outPath, framesRoot, overlays, mine, gate, reportPath is null ? null : (reportPath, at)) { SummaryJson = summaryJson };
        return AuditOutputWriter.Finish(stdout, stderr, result, outputs, job, opener, cancellationToken);
    }
}
