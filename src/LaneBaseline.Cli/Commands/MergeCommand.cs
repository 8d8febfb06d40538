using System.CommandLine;
using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Cli.Commands;

/// <summary>
/// <c>lanebaseline merge</c>: joins the outputs of sharded runs into what one unsharded run writes — partial score
/// states (from <c>score --partial</c>) into the score JSON/CSV/table, or lane files (from <c>detect --shard</c>) into
/// one lane file, byte for byte.
/// </summary>
internal static class MergeCommand
{
    public static Command Create()
    {
        Argument<string[]> inputs = new("inputs") { Description = "State files of every shard, or lane files of every shard.", Arity = ArgumentArity.OneOrMore };
        Option<string> output = new("--output", "-o") { Description = "Merged score JSON (for states) or lane file (for lane files).", Required = true };
        Option<string?> csv = new("--csv") { Description = "States only: also write the per-frame CSV." };
        Option<double?> minF1 = new("--min-f1") { Description = "States only: quality gate, exit 4 when F1@0.50 is below this." };
        Option<int> threads = new("--threads") { Description = "Threads for the bootstrap (results do not depend on it).", DefaultValueFactory = _ => Environment.ProcessorCount };

        Command command = new("merge", "Join the outputs of sharded runs (score states or lane files) into the output of one unsharded run.")
        {
            inputs, output, csv, minF1, threads,
        };
        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            string[] paths = parseResult.GetRequiredValue(inputs);
            string outPath = parseResult.GetRequiredValue(output);
            int threadCount = Math.Max(1, parseResult.GetValue(threads));
            bool[] isState = [.. paths.Select(IsScoreState)];
            if (isState.Distinct().Count() > 1)
            {
                throw new UsageException("merge: give either score states or lane files, not both");
            }

            if (isState[0])
            {
                using AtomicFile? csvFile = parseResult.GetValue(csv) is string c ? new AtomicFile(c) : null;
                TextWriter? csvWriter = csvFile?.Writer;
                int halfIndex = -1;
                IReadOnlyList<ScoredSystem>? systems = null;
                (ScoreStateHeader header, SystemScore[] results) = ScoreStateMerge.Merge(
                    paths,
                    h =>
                    {
                        systems = h.Systems;
                        halfIndex = h.Settings.HalfIndex;
                        if (csvWriter is not null)
                        {
                            ScoreCommand.WriteCsvHeader(csvWriter, h.Systems.Count > 1);
                        }
                    },
                    row =>
                    {
                        if (csvWriter is not null)
                        {
                            ScoreCommand.WriteCsvRows(csvWriter, systems!, halfIndex, row);
                        }
                    });
                stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"merge: {results[0].Overall.Frames} frames from {paths.Length} shard state(s)"));
                var request = new ScoreRequest(header.Truth, header.Systems, header.Settings, header.Resamples, header.Seed, threadCount, outPath, csvFile is null ? null : "csv", parseResult.GetValue(minF1));
                return ScoreCommand.Finish(stdout, stderr, request, results, csvFile);
            }

            if (parseResult.GetValue(csv) is not null || parseResult.GetValue(minF1) is not null)
            {
                throw new UsageException("--csv and --min-f1 apply to score states only");
            }

            using var file = new AtomicFile(outPath);
            long n = LaneFileMerge.Merge(paths, file.Stream);
            file.Commit();
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"merge: {n} records from {paths.Length} file(s) -> {outPath}"));
            return ExitCodes.Success;
        })));
        return command;
    }

    private static bool IsScoreState(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, Directory.Exists(path) ? "is a directory" : "file not found");
        }

        using var stream = File.OpenRead(path);
        var head = new byte[64];
        int n = stream.Read(head, 0, head.Length);
        return head.AsSpan(0, n).IndexOf("\"format\":\"lanebaseline-score-state\""u8) >= 0;
    }
}
