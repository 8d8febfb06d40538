using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Text;
using LaneBaseline.Cli.Bench;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Cli.Commands;

/// <summary>
/// Runs detect: lists or decodes frames, processes them on <see cref="DetectRequest.Threads"/> workers (one pipeline
/// each) and writes the records strictly in input order, flushing each, so the output does not depend on the thread
/// count. With tracking on, the frames of each folder (or the video) form one sequence and run on one worker; image
/// timestamps are index / --fps.
/// </summary>
internal sealed class DetectRunner
{
    private readonly DetectRequest request;
    private readonly TextWriter stderr;
    private readonly string configHash;
    private readonly string configJson;

    public DetectRunner(DetectRequest request, TextWriter stderr)
    {
        this.request = request;
        this.stderr = stderr;
        configHash = request.Camera is null
            ? PresetLoader.Hash(request.Options)
            : "sha256:" + Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(
                Encoding.UTF8.GetBytes(PresetLoader.ToYaml(request.Options) + "\n" + request.Camera.ToJson())).AsSpan(0, 8));
        configJson = "\"" + configHash + "\"";
    }

    /// <summary>Path of the effective-configuration file written beside a lane file: <c>X.lanes.jsonl</c> → <c>X.config.yaml</c>.</summary>
    public static string ConfigPathFor(string output)
    {
        string name = output;
        foreach (string suffix in new[] { ".lanes.jsonl", ".jsonl", ".json" })
        {
            if (name.EndsWith(suffix, StringComparison.OrdinalIgnoreCase))
            {
                return name[..^suffix.Length] + ".config.yaml";
            }
        }

        return name + ".config.yaml";
    }

    public DetectSummary Run()
    {
        bool video = FrameListing.IsVideo(request.Input);
        IReadOnlyList<FrameItem>? images = null;
        if (!video)
        {
            images = FrameListing.ListImages(request.Input);
        }
        else if (!File.Exists(request.Input))
        {
            throw BadInputException.At(request.Input, 0, null, "no such video file");
        }

        string? outDir = Path.GetDirectoryName(Path.GetFullPath(request.Output));
        if (outDir is not null && !Directory.Exists(outDir))
        {
            throw BadInputException.At(request.Output, 0, null, "the output folder does not exist");
        }

        HashSet<string> done = request.Resume ? ReadResumeState() : [];
        string configPath = ConfigPathFor(request.Output);
        WriteConfig(configPath);

        int threads = request.Options.Tracking.Enabled ? 1 : request.Threads;
        if (request.Options.Tracking.Enabled && request.Threads > 1)
        {
            stderr.WriteLine("detect: tracking is on, so frames form one sequence and run on one thread");
        }

#pragma warning disable IDISP004 // the writer owns the stream it is given
        using var writer = new LaneFileWriter(new FileStream(
            request.Output, request.Resume ? FileMode.Append : FileMode.Create, FileAccess.Write, FileShare.Read, 1 << 16));
#pragma warning restore IDISP004
        var skipped = new List<string>();
        int written = 0, lanes = 0;
        long pipelineTicks = 0;
        int total = images?.Count ?? -1;
        var clock = Stopwatch.StartNew();
        TimeSpan lastReport = TimeSpan.Zero;
        using var cancel = new CancellationTokenSource();
        using var queue = new BlockingCollection<Work>(Math.Max(2, 2 * threads));
        var results = new ConcurrentDictionary<int, Outcome>();
        var timings = new ConcurrentQueue<double[]>();
        string[] stageNames = [];
        if (request.Timings)
        {
            Cv2.SetNumThreads(1);
        }
        using var resultReady = new SemaphoreSlim(0);
        int produced = -1;

        var producer = Task.Run(() =>
        {
            int seq = 0;
            try
            {
                foreach (Work w in Enumerate(images, done))
                {
                    queue.Add(w with { Sequence = seq }, cancel.Token);
                    seq++;
                }
            }
            catch (OperationCanceledException)
            {
            }
            catch (Exception ex) when (ex is BadInputException or OpenCVException)
            {
                results[seq] = new Outcome(null, null, ex);
                seq++;
                resultReady.Release();
            }
            finally
            {
                Volatile.Write(ref produced, seq);
                queue.CompleteAdding();
                resultReady.Release();
            }
        });

        var workers = new Task[threads];
        for (int t = 0; t < threads; t++)
        {
            workers[t] = Task.Run(() =>
            {
                using var pipeline = new LanePipeline(request.Options, CameraVanishingPoint()) { MeasureStages = request.Timings };
                using var primitives = request.Timings ? new FloorPrimitives(request.Options.Limits.WorkingWidthPx) : null;
                var runner = new FrameSequenceRunner(pipeline, item => FrameLoader.Load(item.Path!, request.Options.Limits), CheckCameraSize);
                try
                {
                    foreach (Work w in queue.GetConsumingEnumerable(cancel.Token))
                    {
                        // With tracking on (one worker), the runner restarts tracks whenever the sequence changes.
                        Outcome o = ProcessOne(runner, w, ref pipelineTicks, primitives, timings);
                        if (request.Timings && stageNames.Length == 0 && pipeline.Workspace is not null)
                        {
                            stageNames = [.. pipeline.StageNames];
                        }

                        results[w.Sequence] = o;
                        resultReady.Release();
                    }
                }
                catch (OperationCanceledException)
                {
                }
            });
        }

        Exception? fatal = null;
        try
        {
            int next = 0;
            while (true)
            {
                if (results.TryRemove(next, out Outcome? outcome))
                {
                    next++;
                    if (outcome.Error is BadInputException bad && request.KeepGoing && outcome.Item is not null)
                    {
                        stderr.WriteLine("skipped: " + bad.Message);
                        skipped.Add(outcome.Item.Key);
                    }
                    else if (outcome.Error is not null)
                    {
                        fatal = outcome.Error;
                        break;
                    }
                    else
                    {
                        writer.Write(outcome.Record!);
                        written++;
                        lanes += outcome.Record!.Lanes.Count;
                    }

                    if (clock.Elapsed - lastReport > TimeSpan.FromSeconds(2))
                    {
                        lastReport = clock.Elapsed;
                        string of = total >= 0 ? "/" + total.ToString(CultureInfo.InvariantCulture) : string.Empty;
                        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"detect: {next}{of} frames, {next / clock.Elapsed.TotalSeconds:0.0} frames/s"));
                    }

                    continue;
                }

                int p = Volatile.Read(ref produced);
                if (p >= 0 && next >= p && results.IsEmpty)
                {
                    break;
                }

                resultReady.Wait(TimeSpan.FromMilliseconds(200));
            }
        }
        finally
        {
            cancel.Cancel();
            try
            {
                Task.WaitAll([producer, .. workers]);
            }
            catch (AggregateException)
            {
            }

            while (queue.TryTake(out Work? w))
            {
                w.Decoded?.Dispose();
            }
        }

        if (fatal is not null)
        {
            if (fatal is BadInputException)
            {
                throw fatal;
            }

            throw new InvalidOperationException(fatal.Message, fatal);
        }

        double msPerFrame = written > 0 ? TimeSpan.FromTicks(pipelineTicks).TotalMilliseconds / written : 0;
        stderr.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"detect: {written} frames in {clock.Elapsed.TotalSeconds:0.00} s ({(written > 0 ? written / clock.Elapsed.TotalSeconds : 0):0.0} frames/s on {threads} thread(s)); pipeline {msPerFrame:0.00} ms/frame excluding decode"));
        if (request.Timings)
        {
            PrintTimings(stageNames, timings);
        }

        if (skipped.Count > 0)
        {
            stderr.WriteLine("detect: skipped " + skipped.Count.ToString(CultureInfo.InvariantCulture) + " bad frame(s): " + string.Join(", ", skipped));
        }

        return new DetectSummary(written, lanes, done.Count, skipped, configPath, msPerFrame);
    }

    private IEnumerable<Work> Enumerate(IReadOnlyList<FrameItem>? images, HashSet<string> done)
    {
        int taken = 0;
        bool Wanted(FrameItem item) =>
            new ShardSpec(request.ShardIndex, request.ShardCount).ContainsFrame(item.Key) && !done.Contains(item.Key);

        if (images is not null)
        {
            foreach (FrameItem item in images)
            {
                if (request.MaxFrames is int max && taken >= max)
                {
                    yield break;
                }

                if (Wanted(item))
                {
                    taken++;
                    yield return new Work(0, item with { TimestampSeconds = item.Index / request.ImageFps }, null);
                }
            }

            yield break;
        }

        using var reader = new VideoFrameReader(request.Input, request.Options.Limits);
        while (reader.TryRead(out Mat frame, out FrameItem item))
        {
            if (request.MaxFrames is int max && taken >= max)
            {
                frame.Dispose();
                yield break;
            }

            if (!Wanted(item))
            {
                frame.Dispose();
                continue;
            }

            taken++;
            yield return new Work(0, item, frame);
        }
    }

    /// <summary>The image of the point at infinity straight ahead on the road (ground X → ∞, Y = 0), from the camera file.</summary>
    private (double X, double Y)? CameraVanishingPoint()
    {
        if (request.Camera is not { } cam)
        {
            return null;
        }

        (double u, double v) = cam.ProjectGroundToImage(1e7, 0);
        return (u, v);
    }

    private void PrintTimings(string[] names, ConcurrentQueue<double[]> rows)
    {
        // Row layout: one value per stage, then the pipeline total, then the two primitives and their sum.
        double[][] all = [.. rows];
        if (all.Length == 0)
        {
            return;
        }

        string[] labels = [.. names, "pipeline total", .. FloorPrimitives.Names.Select(n => "primitive: " + n), "primitives total"];
        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"timings over {all.Length} frames (ms, OpenCV on 1 thread):"));
        stderr.WriteLine("  stage                              median      p95");
        for (int c = 0; c < labels.Length && c < all[0].Length; c++)
        {
            TimingStats s = TimingStats.From(all.Select(r => r[c]).ToArray());
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {labels[c],-32} {s.Median,8:0.00} {s.P95,8:0.00}"));
        }
    }

    private void CheckCameraSize(FrameItem item, Mat frame)
    {
        if (request.Camera is { } cam && (frame.Cols != cam.ImageWidth || frame.Rows != cam.ImageHeight))
        {
            throw BadInputException.At(
                item.Path ?? item.Key,
                0,
                null,
                string.Create(CultureInfo.InvariantCulture, $"frame size {frame.Cols}x{frame.Rows} differs from the camera file's {cam.ImageWidth}x{cam.ImageHeight} ({request.CameraPath})"));
        }
    }

    private Outcome ProcessOne(FrameSequenceRunner runner, Work w, ref long pipelineTicks, FloorPrimitives? primitives, ConcurrentQueue<double[]> timings)
    {
        try
        {
            LaneRecord? record = null;
            runner.Process(w.Item, w.Decoded, (frame, result) =>
            {
                if (primitives is not null)
                {
                    (double hls, double warp) = primitives.Measure(frame);
                    timings.Enqueue([.. runner.Pipeline.LastStageMs, runner.LastPipelineTime.TotalMilliseconds, hls, warp, hls + warp]);
                }

                record = new LaneRecord
                {
                    Frame = w.Item.Key,
                    Width = frame.Cols,
                    Height = frame.Rows,
                    Lanes = result.Lanes,
                    ExtraJson = [new KeyValuePair<string, string>("config", configJson)],
                };
                WriteImages(runner.Pipeline.Workspace!, w.Item);
            });
            Interlocked.Add(ref pipelineTicks, runner.LastPipelineTime.Ticks);
            return new Outcome(w.Item, record!, null);
        }
        catch (Exception ex) when (ex is BadInputException or OpenCVException or IOException)
        {
            Exception error = ex is BadInputException ? ex : BadInputException.At(w.Item.Path ?? w.Item.Key, 0, null, ex.Message);
            return new Outcome(w.Item, null, error);
        }
        finally
        {
#pragma warning disable IDISP007 // the Work item owns a video frame decoded by the source; image files are decoded and released by the runner
            w.Decoded?.Dispose();
#pragma warning restore IDISP007
        }
    }

    private void WriteImages(FrameWorkspace ws, FrameItem item)
    {
        string stem = item.Key.Replace('#', '_');
        if (request.OverlaysDir is string dir)
        {
            using var canvas = ws.Frame.Clone();
            OverlayRenderer.Draw(ws, canvas);
            if (ws.Enlarged)
            {
                // drawn at the working size, saved at the frame's own size like every other output
                Cv2.Resize(canvas, canvas, new Size(ws.FrameWidth, ws.FrameHeight), 0, 0, InterpolationFlags.Area);
            }

            Save(Path.Combine(dir, Path.ChangeExtension(stem, ".png")), canvas);
        }

        if (request.StagesDir is string sdir && item.Index % request.StagesEvery == 0)
        {
            using Mat sheet = OverlayRenderer.CreateStageSheet(ws);
            Save(Path.Combine(sdir, Path.ChangeExtension(stem, null) + ".stages.png"), sheet);
        }
    }

    private static void Save(string path, Mat image)
    {
        if (!Cv2.ImEncode(".png", image, out byte[] png))
        {
            throw new IOException("cannot write " + path);
        }

        AtomicFile.WriteAllBytes(path, png);
    }

    private void WriteConfig(string path)
    {
        var text = new StringBuilder();
        text.Append("# Effective configuration of a lanebaseline detect run (preset or file: ").Append(request.ConfigSource).Append(").\n");
        text.Append("# Every record of ").Append(Path.GetFileName(request.Output)).Append(" carries \"config\": \"").Append(configHash)
            .Append("\" (SHA-256 of the YAML below, first 16 hex digits).\n");
        if (request.Camera is not null)
        {
            text.Append("# The hash also covers the camera file given with --camera (").Append(request.CameraPath).Append("), reproduced here:\n");
            foreach (string line in request.Camera.ToJson().Split('\n'))
            {
                text.Append("#   ").Append(line.TrimEnd('\r')).Append('\n');
            }
        }

        text.Append(PresetLoader.ToYaml(request.Options));
        AtomicFile.WriteAllText(path, text.ToString());
    }

    /// <summary>Reads the frames already written (dropping an unterminated last line) and checks they used this configuration.</summary>
    private HashSet<string> ReadResumeState()
    {
        var done = new HashSet<string>(StringComparer.Ordinal);
        if (!File.Exists(request.Output))
        {
            return done;
        }

        byte[] bytes = File.ReadAllBytes(request.Output);
        int end = Array.LastIndexOf(bytes, (byte)'\n') + 1;
        if (end < bytes.Length)
        {
            AtomicFile.WriteAllBytes(request.Output, bytes.AsSpan(0, end));
        }

        using var reader = LaneFileReader.Open(request.Output, sizeRequired: false);
        foreach (LaneRecord r in reader.ReadAll())
        {
            string? hash = r.ExtraJson.FirstOrDefault(kv => kv.Key == "config").Value;
            if (hash != configJson)
            {
                throw BadInputException.At(request.Output, r.LineNumber, "config", "--resume: this record was written with another configuration (" + (hash ?? "none") + ", now " + configJson + ")");
            }

            done.Add(r.Frame);
        }

        return done;
    }

    private sealed record Work(int Sequence, FrameItem Item, Mat? Decoded);

    private sealed record Outcome(FrameItem? Item, LaneRecord? Record, Exception? Error);
}
