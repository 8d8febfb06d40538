using System.CommandLine;
using System.Globalization;
using LaneBaseline.Cli.Bench;
using LaneBaseline.Core.Options;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline bench</c>: per-stage latency, throughput and memory beside the bare OpenCV floor.</summary>
internal static class BenchCommand
{
    public static Command Create()
    {
        Option<string> frames = SharedOptions.Frames("Frames to measure: a folder of images, a .txt/.lst list, one image or a video (without it: rendered scenes, --render).");
        Option<int?> render = new("--render") { Description = "Render N scenes (seeded) at the largest --size (default 1280x720) and measure them. Default 24 when --frames is not given." };
        Option<ulong> seed = new("--seed") { Description = "Seed of the rendered scenes.", DefaultValueFactory = _ => 1UL };
        Option<string[]> size = new("--size")
        {
            Description = "Processing size WxH; repeat or separate by commas for several (frames are resized to each). Default: the frames' own size.",
            AllowMultipleArgumentsPerToken = false,
        };
        Option<int> threads = SharedOptions.Threads("Workers to measure with: one pipeline per worker, OpenCV on one thread in each.");
        threads.CustomParser = ParseThreadsToken; // the deprecated list form -j 1,2 still parses (for one release)
        Option<string?> threadCounts = new("--thread-counts") { Description = "Several worker counts to measure in turn, comma-separated (e.g. 1,2); replaces -j." };
        Option<string> config = new("--config", "-c")
        {
            Description = "Preset name (" + string.Join(", ", KnownPresets.Names) + ") or a YAML file.",
            DefaultValueFactory = _ => "default",
        };
        Option<int> warmup = new("--warmup") { Description = "Frame calls per worker before measuring (not recorded).", DefaultValueFactory = _ => 5 };
        Option<int> passes = new("--passes") { Description = "Measured passes over the frames.", DefaultValueFactory = _ => 3 };
        Option<int?> maxFrames = new("--max-frames") { Description = "Most frames read from --frames; they are held decoded in memory (60 when not given, and fewer when they would take more than 1 GiB)." };
        Option<string?> json = new("--json") { Description = "Also write the figures as JSON (docs/bench.md; '-': standard output, the table then goes to stderr)." };

        Command command = new("bench", "Measure per-stage latency, frames per second and memory beside the bare OpenCV primitives on the same frames.")
        {
            frames, render, seed, size, threads, threadCounts, config, warmup, passes, maxFrames, json,
        };

        command.SetAction(parse => CommandRunner.Run(parse, (stdout, stderr) =>
        {
            string? framesPath = parse.GetValue(frames);
            int? renderCount = parse.GetValue(render);
            if (framesPath is not null && renderCount is not null)
            {
                throw new UsageException("give either --frames or --render, not both");
            }

            if (renderCount is < 1 or > 10000)
            {
                throw new UsageException("--render must be between 1 and 10000 scenes");
            }

            int warm = parse.GetValue(warmup);
            if (warm < 0 || warm > 100000)
            {
                throw new UsageException("--warmup must be between 0 and 100000");
            }

            int passCount = parse.GetValue(passes);
            if (passCount < 1 || passCount > 10000)
            {
                throw new UsageException("--passes must be between 1 and 10000");
            }

            int max = parse.GetValue(maxFrames) ?? BenchRequest.DefaultMaxFrames;
            if (max < 1)
            {
                throw new UsageException("--max-frames must be at least 1");
            }

            string configText = parse.GetValue(config)!;
            OutputPaths.Check([("--frames", framesPath), ("--config", File.Exists(configText) ? configText : null)], [("--json", parse.GetValue(json))]);
            var request = new BenchRequest
            {
                FramesPath = framesPath,
                RenderCount = renderCount ?? 24,
                Seed = parse.GetValue(seed),
                Sizes = ParseSizes(parse.GetValue(size) ?? []),
                Threads = WorkerCounts(parse, threads, threadCounts, stderr),
                Options = KnownPresets.Resolve(parse.GetValue(config)!, stderr),
                ConfigSource = parse.GetValue(config)!,
                Warmup = warm,
                Passes = passCount,
                MaxFrames = max,
            };

            string? jsonPath = parse.GetValue(json);
            using AtomicFile? jsonFile = jsonPath is null ? null : new AtomicFile(jsonPath);
            BenchResult result = new BenchRunner(request, stderr).Run();
            BenchReportWriter.WriteTable(result, stdout);
            if (jsonFile is not null)
            {
                BenchReportWriter.WriteJson(result, jsonFile.Stream);
                jsonFile.Commit();
                stderr.WriteLine("bench: figures written to " + jsonPath);
            }

            return ExitCodes.Success;
        }));
        return command;
    }

    internal static IReadOnlyList<(int Width, int Height)> ParseSizes(IEnumerable<string> values)
    {
        var sizes = new List<(int, int)>();
        foreach (string value in values)
        {
            foreach (string part in value.Split(',', StringSplitOptions.TrimEntries))
            {
                (int w, int h) = CommandArguments.ParseFrameSize(part);
                if (!sizes.Contains((w, h)))
                {
                    sizes.Add((w, h));
                }
            }
        }

        return sizes;
    }

    /// <summary>
    /// The worker counts to measure: <c>--thread-counts</c>, else <c>-j</c> (one count; the number of cores by default).
    /// <c>-j 1,2</c> was the list form until 2026-12 and still works for one release, with a deprecation line.
    /// </summary>
    private static IReadOnlyList<int> WorkerCounts(ParseResult parse, Option<int> threads, Option<string?> threadCounts, TextWriter stderr)
    {
        string? list = parse.GetValue(threadCounts);
        System.CommandLine.Parsing.OptionResult? given = parse.GetResult(threads) is { Implicit: false } r ? r : null;
        if (list is not null)
        {
            return given is null ? ParseThreads(list, "--thread-counts") : throw new UsageException("give -j/--threads (one worker count) or --thread-counts (several), not both");
        }

        string? text = given?.Tokens.Count > 0 ? given.Tokens[^1].Value : null;
        if (text is not null && text.Contains(',', StringComparison.Ordinal))
        {
            string spelled = given!.IdentifierToken?.Value ?? "--threads"; // the note repeats what was typed: -j or --threads
            stderr.WriteLine(SharedOptions.DeprecationLine(spelled + " " + text, "--thread-counts " + text));
            return ParseThreads(text, "--threads");
        }

        return [SharedOptions.CheckThreads(parse.GetValue(threads))];
    }

    private static int ParseThreadsToken(System.CommandLine.Parsing.ArgumentResult result)
    {
        string text = result.Tokens.Count > 0 ? result.Tokens[^1].Value : string.Empty;
        if (text.Contains(',', StringComparison.Ordinal))
        {
            return 0; // the deprecated list form; WorkerCounts reads the token itself
        }

        if (!int.TryParse(text, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out int n))
        {
            result.AddError($"Cannot parse argument '{text}' for option '--threads' as expected type 'System.Int32'.");
        }

        return n;
    }

    internal static IReadOnlyList<int> ParseThreads(string text, string optionName = "--thread-counts")
    {
        var list = new List<int>();
        foreach (string part in text.Split(',', StringSplitOptions.TrimEntries))
        {
            if (!int.TryParse(part, NumberStyles.None, CultureInfo.InvariantCulture, out int n) || n < 1 || n > 256)
            {
                throw new UsageException(optionName + " must be a comma-separated list of worker counts between 1 and 256 (e.g. 1,2), got '" + text + "'");
            }

            if (!list.Contains(n))
            {
                list.Add(n);
            }
        }

        return list;
    }
}
