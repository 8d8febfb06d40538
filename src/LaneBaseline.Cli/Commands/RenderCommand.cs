using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Vision.Synthetic;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>render -o DIR</c>: synthetic road scenes with exact ground truth and a camera file, from a seed.</summary>
internal static class RenderCommand
{
    public static Command Create()
    {
        Option<string> outDir = SharedOptions.Output("Output folder (frames, truth.lanes.jsonl, camera.json).");
        Option<string> legacyOut = SharedOptions.LegacyOut();
        Option<ulong> seed = new("--seed") { Description = "Seed of everything random.", DefaultValueFactory = _ => 1UL };
        Option<int> count = new("--count") { Description = "Number of scenes.", DefaultValueFactory = _ => 10 };
        Option<string?> size = new("--size") { Description = "Frame size WxH (1280x720 when neither it nor --camera is given)." };
        Option<string?> conditions = new("--conditions")
        {
            Description = "Comma-separated conditions for every scene, or 'none' (default: clean and each condition in turn). Known: " +
                string.Join(", ", KnownConditions.Every) + ".",
        };
        Option<double?> severity = new("--severity") { Description = "Severity in [0, 1] for the chosen conditions (default: seeded random per scene)." };
        Option<int> sequenceLength = new("--sequence-length") { Description = "Frames per scene; 1 renders stills.", DefaultValueFactory = _ => 1 };
        Option<double> fps = new("--fps") { Description = "Frame rate of sequences.", DefaultValueFactory = _ => 10.0 };
        Option<string> format = new("--format") { Description = "Frame format: jpg or png.", DefaultValueFactory = _ => "jpg" };
        Option<int> quality = new("--quality") { Description = "JPEG quality 1-100.", DefaultValueFactory = _ => 92 };
        Option<string?> sweep = new("--sweep") { Description = "Render every scene at severities 0, 0.25, 0.5, 0.75, 1 of this condition, tagged severity=X." };
        Option<int> threads = SharedOptions.Threads("Worker threads (output is identical for any value).");
        Option<string?> cameraFile = new("--camera") { Description = "camera.json to render through (sets the frame size; default: 1.5 m high, 2° pitch, f = 0.78125·width)." };
        Option<string?> overlays = new("--overlays") { Description = "Also write PNG frames with the truth drawn over them to this folder." };

        Command command = new("render", "Render synthetic road scenes with exact lane truth and a camera file, from a seed.")
        {
            outDir, seed, count, size, conditions, severity, sequenceLength, fps, format, quality, sweep, threads, cameraFile, overlays,
        };
        SharedOptions.AddOutput(command, outDir, legacyOut, required: true);

        command.SetAction(parseResult => CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            int n = parseResult.GetValue(count);
            int len = parseResult.GetValue(sequenceLength);
            int threadCount = parseResult.GetValue(threads);
            string outPath = SharedOptions.GetOutput(parseResult, outDir, legacyOut, stderr)!;
            if (StandardStreams.IsDash(outPath))
            {
                throw new UsageException("render writes a folder of frames; -o - (standard output) does not apply");
            }

            double frameRate = parseResult.GetValue(fps);
            string fmt = parseResult.GetValue(format)!.ToLowerInvariant();
            string? sweepName = parseResult.GetValue(sweep);
            string? conditionText = parseResult.GetValue(conditions);
            double? sev = parseResult.GetValue(severity);
            int q = parseResult.GetValue(quality);
            if (n < 1 || n > 100000)
            {
                throw new UsageException("--count must be between 1 and 100000.");
            }

            if (len < 1 || len > 100000)
            {
                throw new UsageException("--sequence-length must be between 1 and 100000.");
            }

            if (threadCount < 1 || threadCount > 256)
            {
                throw new UsageException("--threads must be between 1 and 256.");
            }

            if (!(frameRate > 0 && frameRate <= 1000))
            {
                throw new UsageException("--fps must be in (0, 1000].");
            }

            if (fmt is not ("jpg" or "jpeg" or "png"))
            {
                throw new UsageException($"--format must be jpg or png, not '{fmt}'.");
            }

            if (q < 1 || q > 100)
            {
                throw new UsageException("--quality must be between 1 and 100.");
            }

            if (sev is double sv && !(sv >= 0 && sv <= 1))
            {
                throw new UsageException("--severity must be in [0, 1].");
            }

            IReadOnlyList<string>? conditionList = ParseConditions(conditionText);
            if (sweepName is not null)
            {
                if (!KnownConditions.IsKnown(sweepName))
                {
                    throw new UsageException($"--sweep: unknown condition '{sweepName}'. Known: {string.Join(", ", KnownConditions.Every)}.");
                }

                if (conditionList is not null || sev is not null)
                {
                    throw new UsageException("--sweep varies one condition by itself; do not combine it with --conditions or --severity.");
                }
            }

            CameraModel camera;
            string? cameraPath = parseResult.GetValue(cameraFile);
            if (cameraPath is not null)
            {
                if (parseResult.GetResult(size) is { Implicit: false })
                {
                    throw new UsageException("--size and --camera both set the frame size; give one of them.");
                }

                camera = CameraModel.Load(cameraPath);
            }
            else
            {
                (int w, int h) = CommandArguments.ParseFrameSize(parseResult.GetValue(size) ?? "1280x720");
                camera = CameraModel.CreateDefault(w, h);
            }

            var options = new RenderJobOptions
            {
                OutDir = outPath,
                Seed = parseResult.GetValue(seed),
                Count = n,
                SequenceLength = len,
                FramesPerSecond = frameRate,
                Camera = camera,
                Conditions = conditionList,
                Severity = sev,
                Sweep = sweepName,
                Format = fmt == "png" ? "png" : "jpg",
                JpegQuality = q,
                Threads = threadCount,
                OverlayDir = parseResult.GetValue(overlays),
            };
            // A folder output that is a file, or lies under one, is bad input (exit 3) as in every other command.
            OutputPaths.Check([], [("-o/--output", options.OutDir), ("--overlays", options.OverlayDir)], outputsAreFiles: false);

            var clock = Stopwatch.StartNew();
            int frames;
            try
            {
                using var progress = new ProgressDisplay("render", "frames", stderr);
                frames = RenderJob.Run(options, (done, total) =>
                {
                    progress.Report(done, total);
                    if (done == total)
                    {
                        progress.Finish();
                        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"render: {done}/{total} frames ({100.0 * done / total:0}%)"));
                    }
                });
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
            {
                throw new UsageException($"-o/--output {options.OutDir}: cannot write there: {ex.Message}", ex);
            }
            double seconds = clock.Elapsed.TotalSeconds;
            stdout.WriteLine(string.Create(
                CultureInfo.InvariantCulture,
                $"rendered {frames} frames ({camera.ImageWidth}x{camera.ImageHeight}) in {seconds:0.0} s ({frames / Math.Max(seconds, 1e-9):0.0} frames/s) to {options.OutDir}"));
            stdout.WriteLine("truth: " + Path.Combine(options.OutDir, "truth.lanes.jsonl"));
            stdout.WriteLine("camera: " + Path.Combine(options.OutDir, "camera.json"));
            return ExitCodes.Success;
        }));
        return command;
    }

    internal static IReadOnlyList<string>? ParseConditions(string? text)
    {
        if (text is null)
        {
            return null;
        }

        string trimmed = text.Trim();
        if (trimmed.Length == 0 || trimmed is "none" or "clean")
        {
            return [];
        }

        var list = new List<string>();
        foreach (string part in trimmed.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
        {
            if (!KnownConditions.IsKnown(part))
            {
                throw new UsageException($"--conditions: unknown condition '{part}'. Known: {string.Join(", ", KnownConditions.Every)} (or 'none').");
            }

            if (!list.Contains(part, StringComparer.Ordinal))
            {
                list.Add(part);
            }
        }

        return list;
    }
}
