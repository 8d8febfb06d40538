using System.CommandLine;
using System.Globalization;
using LaneBaseline.Core.Options;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline tune --frames DIR --truth T -o best.yaml</c>: search preset parameters on labelled frames.</summary>
internal static class TuneCommand
{
    public static Command Create()
    {
        Option<string> frames = SharedOptions.Frames("Folder (recursive), .txt/.lst list or single image of the labelled frames.");
        frames.Required = true;
        Option<string> truth = new("--truth") { Description = "Truth lane file for the frames (split into tuning and holdout frames); '-' reads standard input.", Required = true };
        Option<string?> space = new("--space") { Description = "Search-space YAML (default: the built-in configs/tune-space.yaml)." };
        Option<string> config = new("--config", "-c")
        {
            Description = "Base preset name (" + string.Join(", ", KnownPresets.Names) + ") or a YAML file; trial values are set on it.",
            DefaultValueFactory = _ => "default",
        };
        Option<int> budget = new("--budget") { Description = "Trials to evaluate.", DefaultValueFactory = _ => 40 };
        Option<ulong> seed = new("--seed") { Description = "Seed of the search.", DefaultValueFactory = _ => 1UL };
        Option<string> objective = new("--objective") { Description = "f1 (F1 at IoU 0.5), mf1 (mean F1 over IoU 0.50:0.05:0.95) or accuracy (row-sampled point accuracy).", DefaultValueFactory = _ => "f1" };
        Option<double?> holdout = new("--holdout") { Description = "Fraction of the truth frames kept out of tuning, chosen by a hash of the frame key (default 0.3)." };
        Option<string?> holdoutTruth = new("--holdout-truth") { Description = "A separate truth file of holdout frames (replaces --holdout; its frames are looked up under --frames)." };
        Option<bool> allowOverlap = new("--allow-overlap") { Description = "Allow reporting the score on frames that were also used for tuning." };
        Option<int> threads = SharedOptions.Threads("Trials evaluated in parallel (results do not depend on it).");
        Option<bool> resume = new("--resume") { Description = "Reuse the trials already in OUT.trials.jsonl and continue the search." };
        Option<string?> date = new("--date") { Description = "Date written in the output header (ISO 8601, UTC; default now), e.g. for reproducible files." };
        Option<string> output = SharedOptions.Output("Preset YAML to write ('-': standard output); the trial log goes to OUT.trials.jsonl beside it (tune.trials.jsonl for '-').");
        output.Required = true;
        Option<bool> calibrate = new("--calibrate") { Description = "Instead of a search: fit the preset's confidence calibration (score = probability of a true positive at IoU 0.50) on all truth frames and write the preset with its calibration section (docs/detect.md)." };
        Option<double> l2 = new("--calibration-l2") { Description = "With --calibrate: L2 penalty on the standardised logistic weights.", DefaultValueFactory = _ => 1.0 };
        Option<bool> logisticOnly = new("--logistic-only") { Description = "With --calibrate: the logistic map alone, without the isotonic step." };
        Option<string?> table = new("--calibration-table") { Description = "With --calibrate: also write one CSV row per reported lane (frame, lane, outcome at IoU 0.50, every evidence feature, calibrated score) to this file ('-': standard output, the summary line then goes to stderr), to inspect or refit the mapping." };

        Command command = new("tune", "Search preset parameters for the best score on labelled frames, keeping holdout frames out of the search.")
        {
            frames, truth, space, config, budget, seed, objective, holdout, holdoutTruth, allowOverlap, threads, resume, date, output,
            calibrate, l2, logisticOnly, table,
        };

        command.SetAction(parse => CommandRunner.Run(parse, (stdout, stderr) =>
        {
            int n = SharedOptions.CheckThreads(parse.GetValue(threads));

            int b = parse.GetValue(budget);
            if (b < 1 || b > 100_000)
            {
                throw new UsageException("--budget must be between 1 and 100000");
            }

            string obj = parse.GetValue(objective)!;
            if (obj is not ("f1" or "mf1" or "accuracy"))
            {
                throw new UsageException("--objective must be f1, mf1 or accuracy, got '" + obj + "'");
            }

            double? fraction = parse.GetValue(holdout);
            string? second = parse.GetValue(holdoutTruth);
            if (fraction is not null && second is not null)
            {
                throw new UsageException("give either --holdout or --holdout-truth, not both");
            }

            if (fraction is double f && (!(f >= 0) || f >= 1))
            {
                throw new UsageException("--holdout must be a fraction in [0, 1)");
            }

            string outPath = parse.GetValue(output)!;
            string configText = parse.GetValue(config)!;
            // --calibrate may write the calibration into the preset it read (-o P --config P): the preset is read
            // whole before the output is committed atomically, and updating a preset in place is its purpose.
            bool inPlace = parse.GetValue(calibrate);
            OutputPaths.Check(
                [("--frames", parse.GetValue(frames)), ("--truth", parse.GetValue(truth)), ("--space", parse.GetValue(space)), ("--config", File.Exists(configText) && !inPlace ? configText : null), ("--holdout-truth", second)],
                [("-o", outPath), ("-o (its trial log)", parse.GetValue(calibrate) ? null : TuneRunner.LogPathFor(outPath)), ("--calibration-table", parse.GetValue(table))]);
            if (parse.GetValue(table) is not null && !parse.GetValue(calibrate))
            {
                throw new UsageException("--calibration-table needs --calibrate");
            }

            var request = new TuneRequest
            {
                Frames = parse.GetValue(frames)!,
                Truth = InputSpool.Input(parse.GetValue(truth)!),
                SpacePath = parse.GetValue(space),
                ConfigSource = parse.GetValue(config)!,
                Budget = b,
                Seed = parse.GetValue(seed),
                Objective = obj,
                HoldoutFraction = second is null ? fraction ?? 0.3 : 0,
                HoldoutTruth = second,
                AllowOverlap = parse.GetValue(allowOverlap),
                Threads = n,
                Resume = parse.GetValue(resume),
                Date = ParseDate(parse.GetValue(date)),
                Output = parse.GetValue(output)!,
            };
            if (parse.GetValue(calibrate))
            {
                double lambda = parse.GetValue(l2);
                if (!(lambda >= 0) || lambda > 1e6)
                {
                    throw new UsageException("--calibration-l2 must be between 0 and 1000000");
                }

                CalibrationSummary c = new CalibrationRunner(request, lambda, !parse.GetValue(logisticOnly), stderr) { TablePath = parse.GetValue(table) }.Run();
                // With the table or the preset on standard output ('-'), the summary goes to stderr so stdout holds only that file.
                TextWriter report = parse.GetValue(table) == "-" || request.Output == "-" ? stderr : stdout;
                report.WriteLine(string.Create(
                    CultureInfo.InvariantCulture,
                    $"calibration: {c.Lanes} lanes ({c.Positives} true positives at IoU 0.50) on {c.Frames} frames; ECE on these frames {c.EceBefore:0.0000} raw -> {c.EceAfter:0.0000} calibrated; preset written to {request.Output}"));
                return ExitCodes.Success;
            }

            TuneSummary summary = new TuneRunner(request, stderr).Run();
            stdout.WriteLine(string.Create(
                CultureInfo.InvariantCulture,
                $"{request.Objective}: base {summary.BaseTuning:0.0000} -> tuned {summary.TunedTuning:0.0000} on {summary.TuningFrames} tuning frames; base {summary.BaseHoldout:0.0000} -> tuned {summary.TunedHoldout:0.0000} on {summary.HoldoutFrames} holdout frames{(summary.Overlap ? " (the same frames: --allow-overlap)" : string.Empty)}; preset written to {request.Output}"));
            return ExitCodes.Success;
        }));
        return command;
    }

    private static string ParseDate(string? text)
    {
        if (text is null)
        {
            return DateTime.UtcNow.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture);
        }

        if (!DateTimeOffset.TryParse(text, CultureInfo.InvariantCulture, DateTimeStyles.AssumeUniversal, out DateTimeOffset d))
        {
            throw new UsageException("--date must be an ISO 8601 date or time, got '" + text + "'");
        }

        return d.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture);
    }
}
