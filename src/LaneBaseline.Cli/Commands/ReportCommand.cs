using System.CommandLine;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline report</c>: one self-contained HTML page from score results (and a worst-frame gallery).</summary>
internal static class ReportCommand
{
    public static Command Create()
    {
        Option<string> score = new("--score") { Description = "Results of 'score --json' (one or several systems).", Required = true };
        Option<string> output = new("--output", "-o") { Description = "The HTML page to write.", Required = true };
        Option<string?> frames = new("--frames") { Description = "Folder of the frame images (frame keys are relative to it); with --truth and --pred, draws the worst frames." };
        Option<string?> truth = new("--truth") { Description = "Ground-truth lane file, for the worst-frame gallery." };
        Option<string[]> pred = new("--pred") { Description = "Prediction lane file for the gallery; repeat as NAME=FILE for several systems.", AllowMultipleArgumentsPerToken = false };
        Option<string?> generatedAt = new("--generated-at") { Description = "Time printed as 'generated' (ISO 8601), for reproducible pages; default now." };

        Command command = new("report", "Write one self-contained HTML page (tables, charts, worst frames, settings) from score results.\n" + SafetyNotice.Text)
        {
            score, output, frames, truth, pred, generatedAt,
        };

        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            string scorePath = parseResult.GetRequiredValue(score);
            string outPath = parseResult.GetRequiredValue(output);
            string? framesDir = parseResult.GetValue(frames);
            string? truthPath = parseResult.GetValue(truth);
            string[] preds = parseResult.GetValue(pred) ?? [];
            DateTimeOffset at = ReportPage.ParseGeneratedAt(parseResult.GetValue(generatedAt));
            int given = (framesDir is null ? 0 : 1) + (truthPath is null ? 0 : 1) + (preds.Length == 0 ? 0 : 1);
            if (given is 1 or 2)
            {
                throw new UsageException("the worst-frame gallery needs --frames, --truth and --pred together");
            }

            GalleryRequest? gallery = given == 3 ? new GalleryRequest(framesDir!, truthPath!, ScoreCommand.ParseSystems(preds)) : null;
            ScoreDocument doc = ScoreDocumentReader.Read(scorePath);
            ReportPage.Write(outPath, doc, scorePath, gallery, at, cancellationToken);
            stderr.WriteLine("report: wrote " + outPath);
            return ExitCodes.Success;
        })));
        return command;
    }
}
