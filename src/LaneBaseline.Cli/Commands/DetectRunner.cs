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
internal sealed partial class DetectRunner
{
    private readonly DetectRequest request;
    private readonly TextWriter stderr;
    private readonly string configHash;
    private readonly string configJson;

    /// <summary>The keys detect adds to every record: the configuration hash and, for <c>--shard K/N</c>, the shard (read by merge).</summary>
    private readonly KeyValuePair<string, string>[] extraJson;

    public DetectRunner(DetectRequest request, TextWriter stderr)
    {
        this.request = request;
        this.stderr = stderr;
        configHash = request.Camera is null
            ? PresetLoader.Hash(request.Options)
            : "sha256:" + Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(
                Encoding.UTF8.GetBytes(PresetLoader.ToYaml(WithMetricView(request.Options)) + "\n" + request.Camera.ToJson())).AsSpan(0, 8));
        configJson = "\"" + configHash + "\"";
        extraJson = request.ShardCount > 1
            ? [new("config", configJson), new("shard", "\"" + new ShardSpec(request.ShardIndex, request.ShardCount).ToString() + "\"")]
            : [new("config", configJson)];
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

    public DetectSummary Run(CancellationToken cancellationToken = default)
    {
        bool video = FrameListing.IsVideo(request.Input);
        IReadOnlyList<FrameItem>? images = null;
        if (!video)
        {
            images = FrameListing.ListImages(request.Input, request.FollowLinks);
        }
        else if (!File.Exists(request.Input))
        {
            throw BadInputException.At(request.Input, 0, null, "no such video file");
        }

        bool toStdout = StandardStreams.IsDash(request.Output);
        if (!toStdout && Path.GetDirectoryName(Path.GetFullPath(request.Output)) is string outDir)
        {
            Directory.CreateDirectory(outDir); // a missing output folder is created, as for every output
        }

        // The lane file is written to a locked temporary beside it and renamed at the end, so a failed or
        // interrupted run leaves the old file as it was; --resume continues what a killed run left in the temporary
        // (or the old file), byte for byte. The configuration file is renamed into place right after it.
        using AtomicFile output = request.Resume ? AtomicFile.Resume(request.Output) : new AtomicFile(request.Output);
        HashSet<string> done = request.Resume ? ReadResumeState(output.Stream) : [];
        string? configPath = toStdout ? null : ConfigPathFor(request.Output);
        using AtomicFile? configFile = configPath is null ? null : new AtomicFile(configPath);
        configFile?.Writer.Write(ConfigText());

        int threads = request.Options.Tracking.Enabled ? 1 : request.Threads;
        if (request.Options.Tracking.Enabled && request.Threads > 1)
        {
            stderr.WriteLine("detect: tracking is on, so frames form one sequence and run on one thread");
        }

#pragma warning disable IDISP004 // the writer owns the stream it is given; NonClosingStream only forwards to the AtomicFile's
        using var writer = new LaneFileWriter(new NonClosingStream(output.Stream));
#pragma warning restore IDISP004
        var skipped = new List<string>();
        int written = 0, lanes = 0;
        long pipelineTicks = 0;
        int total = images?.Count ?? -1;
        var clock = Stopwatch.StartNew();
        using var progress = new ProgressDisplay("detect", "frames", stderr);
        using var cancel = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
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
        }, CancellationToken.None); // they stop through the linked token

        var workers = new Task[threads];
        for (int t = 0; t < threads; t++)
        {
            workers[t] = Task.Run(() =>
            {
                using var pipeline = new LanePipeline(request.Options, CameraVanishingPoint(), request.Camera) { MeasureStages = request.Timings };
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
            }, CancellationToken.None); // they stop through the linked token
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

                    progress.Report(next, total);

                    continue;
                }

                cancellationToken.ThrowIfCancellationRequested();
                int p = Volatile.Read(ref produced);
                if (p >= 0 && next >= p && results.IsEmpty)
                {
                    break;
                }

                resultReady.Wait(TimeSpan.FromMilliseconds(200), CancellationToken.None); // the token is checked at the top of the loop
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

        progress.Finish();
        if (fatal is not null)
        {
            if (fatal is BadInputException)
            {
                throw fatal;
            }

            throw new InvalidOperationException(fatal.Message, fatal);
        }

        cancellationToken.ThrowIfCancellationRequested();
        output.Commit(); // every record was flushed as written

        configFile?.Commit();

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

    private sealed record Work(int Sequence, FrameItem Item, Mat? Decoded);

    private sealed record Outcome(FrameItem? Item, LaneRecord? Record, Exception? Error);
}
