using System.CommandLine;
using LaneBaseline.Core;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Reporting.Audit;
using LaneBaseline.Reporting.Bench;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline report</c>: one self-contained HTML page from score results (and a worst-frame gallery).</summary>
internal static class ReportCommand
{
    public static Command Create()
    {
        Option<string?> score = new("--score") { Description = "Results of 'score --json' (one or several systems). At least one of --score and --audit." };
        Option<string?> audit = new("--audit") { Description = "Findings of 'audit' (JSON Lines): adds findings per rule and the first findings." };
        Option<string?> bench = new("--bench") { Description = "Results of 'bench --json': adds per-stage cost bars beside the OpenCV floor (needs --score)." };
        Option<string> output = SharedOptions.Output("The HTML page to write ('-': standard output).");
        output.Required = true;
        Option<string> frames = SharedOptions.Frames("Folder of the frame images (frame keys are relative to it); with --truth and --pred, draws the worst frames.");
        Option<string?> truth = new("--truth") { Description = "Ground-truth lane file, for the worst-frame gallery." };
        Option<string[]> pred = new("--pred") { Description = "Prediction lane file for the gallery; repeat as NAME=FILE for several systems.", AllowMultipleArgumentsPerToken = false };
        Option<string?> generatedAt = new("--generated-at") { Description = "Time printed as 'generated' (ISO 8601), for reproducible pages; default now." };
        Option<string?> focus = new("--focus") { Description = "The network of the Largest regressions gallery (default: the first system not named 'baseline' or 'base')." };
        Option<int> threads = SharedOptions.Threads("Worker threads for scoring the gallery's frames (the page does not depend on it).");

        Command command = new("report", "Write one self-contained HTML page (tables, charts, worst frames, audit findings, settings) from score results and/or audit findings.")
        {
            score, audit, bench, output, frames, truth, pred, generatedAt, threads, focus,
        };

        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            OutputPaths.Check(
                [("--score", parseResult.GetValue(score)), ("--audit", parseResult.GetValue(audit)), ("--bench", parseResult.GetValue(bench)), ("--truth", parseResult.GetValue(truth)), .. OutputPaths.Preds(parseResult.GetValue(pred))],
                [("--output", parseResult.GetValue(output))]);
            OutputPaths.Check([], [("--output (its gallery folder)", OutputPaths.GalleryFolder(parseResult.GetValue(output), parseResult.GetValue(frames)))], outputsAreFiles: false);
            string? scorePath = parseResult.GetValue(score);
            string? auditPath = parseResult.GetValue(audit);
            if (scorePath is null && auditPath is null)
            {
                throw new UsageException("report needs --score, --audit or both");
            }

            string outPath = parseResult.GetRequiredValue(output);
            string? framesDir = parseResult.GetValue(frames);
            string? truthPath = parseResult.GetValue(truth);
            string[] preds = parseResult.GetValue(pred) ?? [];
            DateTimeOffset at = ReportPage.ParseGeneratedAt(parseResult.GetValue(generatedAt));
            int threadCount = SharedOptions.CheckThreads(parseResult.GetValue(threads));

            ScoreDocument? doc = scorePath is null ? null : ScoreDocumentReader.Read(scorePath);
            if (framesDir is not null && truthPath is null && preds.Length == 0 && doc is not null)
            {
                // report --score S.json --frames DIR: the truth and prediction paths recorded in the score file
                truthPath = doc.Setting("truth") ?? throw BadInputException.At(scorePath!, 0, "settings.truth", "the score file records no truth path; give --truth and --pred");
                preds = [.. doc.Systems.Select(s => s.Name + "=" + (doc.Setting("predictions." + s.Name)
                    ?? throw BadInputException.At(scorePath!, 0, "settings.predictions", $"the score file records no path for system '{s.Name}'; give --truth and --pred")))];
            }

            int given = (framesDir is null ? 0 : 1) + (truthPath is null ? 0 : 1) + (preds.Length == 0 ? 0 : 1);
            if (given is 1 or 2)
            {
                throw new UsageException("the worst-frame gallery needs --frames with --score (paths from the score file), or --frames, --truth and --pred together");
            }

            if (given == 3 && scorePath is null)
            {
                throw new UsageException("the worst-frame gallery ranks frames by score: it needs --score");
            }

            string? focusName = parseResult.GetValue(focus);
            GalleryRequest? gallery = given == 3 ? new GalleryRequest(framesDir!, truthPath!, CommandArguments.ParseSystems(preds), threadCount) { Focus = focusName } : null;
            if (focusName is not null && (gallery is null || gallery.Systems.All(s => s.Name != focusName)))
            {
                throw new UsageException($"--focus {focusName}: needs the gallery and a system of that name");
            }
            AuditSummary? findings = auditPath is null ? null : AuditFindingsReader.Read(auditPath);
            string? benchPath = parseResult.GetValue(bench);
            if (benchPath is not null && scorePath is null)
            {
                throw new UsageException("--bench adds a section to a scoring report: it needs --score");
            }

            BenchSummary? cost = benchPath is null ? null : BenchSummaryReader.Read(benchPath);
            ReportPage.Write(outPath, doc, scorePath, findings, gallery, at, cancellationToken, cost);
            stderr.WriteLine("report: wrote " + outPath);
            return ExitCodes.Success;
        })));
        return command;
    }
}
