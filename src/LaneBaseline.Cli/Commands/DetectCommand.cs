using System.CommandLine;
using System.Globalization;
using LaneBaseline.Core.Options;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline detect FRAMES -o OUT.lanes.jsonl</c>: the classical pipeline over images or a video.</summary>
internal static class DetectCommand
{
    public static Command Create()
    {
        Option<string> frames = SharedOptions.Frames("Frames: a folder of images (recursive, sorted), a .txt/.lst list of image paths, one image, or a video file.");
        Argument<string?> framesArgument = new("FRAMES")
        {
            Description = "The frames, as --frames (this positional form is deprecated).",
            Arity = ArgumentArity.ZeroOrOne,
            Hidden = true,
        };
        Option<string> output = SharedOptions.Output("Lane file to write (JSON lines, one record per frame); '-' streams the records to standard output.");
        output.Required = true;
        Option<string> config = new("--config", "-c")
        {
            Description = "Preset name (" + string.Join(", ", KnownPresets.Names) + ") or a YAML file.",
            DefaultValueFactory = _ => "default",
        };
        Option<string?> camera = new("--camera") { Description = "Camera file (camera.json): the horizon and vanishing point come from it instead of being estimated; frames must have its size." };
        Option<string?> overlays = new("--overlays") { Description = "Folder for one overlay PNG per frame (frame key + .png)." };
        Option<string?> stagesDir = new("--stages") { Description = "Folder for a contact sheet of every stage's image (frame key + .stages.png)." };
        Option<int> stagesEvery = new("--stages-every") { Description = "With --stages: a sheet for every N-th frame (1: every frame).", DefaultValueFactory = _ => 1 };
        Option<int> threads = SharedOptions.Threads("Frames processed in parallel (output order and bytes do not depend on it).");
        Option<string?> shard = new("--shard") { Description = "K/N (0 <= K < N): process only the frames whose sequence (frame key without its trailing number) hashes to shard K (stable FNV-1a hash, as score and audit --shard), so tracked sequences are never split; join shards with 'merge'." };
        Option<bool> resume = new("--resume") { Description = "Keep the records already in the output file and process only the missing frames." };
        Option<bool> keepGoing = new("--keep-going") { Description = "Report a bad frame on stderr, skip it and continue; the skipped frames are listed at the end." };
        Option<bool> followLinks = new("--follow-links") { Description = "Enter symbolic links to folders when scanning a frames folder (without it they are skipped; each real folder is entered once, so link loops end)." };
        Option<int?> maxFrames = new("--max-frames") { Description = "Stop after N frames (after --shard)." };
        Option<bool> timings = new("--timings")
        {
            Description = "Print per-stage milliseconds (median, p95) on stderr beside the cost of the bare OpenCV primitives (full-frame BGR->HLS conversion and perspective warp) on the same frames; sets OpenCV to one thread.",
        };
        Option<double> fps = new("--fps") { Description = "Frame rate of image sequences, for the tracker's timestamps (videos use their own).", DefaultValueFactory = _ => 10 };

        Command command = new("detect", "Run the classical lane pipeline over frames and write one lane-file record per frame.")
        {
            frames, framesArgument, output, config, camera, overlays, stagesDir, stagesEvery, threads, shard, resume, keepGoing, followLinks, maxFrames, fps, timings,
        };

        command.Validators.Add(result =>
        {
            bool option = result.GetResult(frames) is not null, positional = result.GetResult(framesArgument) is { Tokens.Count: > 0 };
            if (option == positional)
            {
                result.AddError(option ? "give the frames once: --frames FRAMES (the positional FRAMES is its deprecated form)" : "Option '--frames' is required.");
            }
        });
        command.SetAction((parse, cancellationToken) => Task.FromResult(CommandRunner.Run(parse, (stdout, stderr) =>
        {
            int n = SharedOptions.CheckThreads(parse.GetValue(threads));
            string input = parse.GetValue(frames) ?? parse.GetValue(framesArgument)!;
            if (parse.GetValue(frames) is null)
            {
                stderr.WriteLine(SharedOptions.DeprecationLine("the positional FRAMES", "--frames FRAMES"));
            }

            string outputPath = parse.GetValue(output)!;
            if (StandardStreams.IsDash(outputPath) && parse.GetValue(resume))
            {
                throw new UsageException("--resume continues a lane file; it cannot continue standard output (-o -)");
            }

            int every = parse.GetValue(stagesEvery);
            if (every < 1)
            {
                throw new UsageException("--stages-every must be at least 1");
            }

            int? limit = parse.GetValue(maxFrames);
            if (limit is < 1)
            {
                throw new UsageException("--max-frames must be at least 1");
            }

            double rate = parse.GetValue(fps);
            if (!double.IsFinite(rate) || rate <= 0 || rate > 10000)
            {
                throw new UsageException("--fps must be a positive frame rate");
            }

            string configText = parse.GetValue(config)!;
            (string, string?)[] inputs = [("--frames", input), ("--camera", parse.GetValue(camera)), ("--config", File.Exists(configText) ? configText : null)];
            OutputPaths.Check(inputs, [("-o", outputPath), ("-o (its configuration)", StandardStreams.IsDash(outputPath) ? null : DetectRunner.ConfigPathFor(outputPath))]);
            OutputPaths.Check(inputs, [("--overlays", parse.GetValue(overlays))], outputsAreFiles: false);
            OutputPaths.Check(inputs, [("--stages", parse.GetValue(stagesDir))], outputsAreFiles: false);
            (int k, int total) = ParseShard(parse.GetValue(shard));
            var request = new DetectRequest
            {
                Input = input,
                Output = outputPath,
                Options = KnownPresets.Resolve(parse.GetValue(config)!, stderr),
                ConfigSource = parse.GetValue(config)!,
                OverlaysDir = parse.GetValue(overlays),
                StagesDir = parse.GetValue(stagesDir),
                StagesEvery = every,
                Threads = n,
                ShardIndex = k,
                ShardCount = total,
                Resume = parse.GetValue(resume),
                KeepGoing = parse.GetValue(keepGoing),
                FollowLinks = parse.GetValue(followLinks),
                MaxFrames = limit,
                ImageFps = rate,
                Timings = parse.GetValue(timings),
                Camera = parse.GetValue(camera) is string cameraPath ? Core.Geometry.CameraModel.Load(cameraPath) : null,
                CameraPath = parse.GetValue(camera),
            };
            DetectSummary summary = new DetectRunner(request, stderr).Run(cancellationToken);
            string where = StandardStreams.IsDash(request.Output) ? "standard output" : request.Output;
            string configNote = summary.ConfigPath is null ? "the records carry the configuration hash" : "configuration in " + summary.ConfigPath;
            stdout.WriteLine(string.Create(
                CultureInfo.InvariantCulture,
                $"{summary.Written} frames written to {where} ({summary.Lanes} lanes, {summary.Skipped.Count} skipped, {summary.Resumed} kept from a previous run); {configNote}"));
            return ExitCodes.Success;
        })));
        return command;
    }

    private static (int K, int N) ParseShard(string? text) =>
        LaneInputs.ParseShard(text) is { } spec ? (spec.Index, spec.Count) : (0, 1);
}
