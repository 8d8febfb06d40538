using System.Diagnostics;
using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Synthetic;
using OpenCvSharp;

namespace LaneBaseline.Cli.Bench;

/// <summary>
/// Runs bench: decodes the frames once (timing the decode), then for every size and worker count runs a warm-up,
/// the measured passes with the pipeline and the floor alternating A/B per frame on the same decoded frame, and a
/// pipeline-only pass timed by the wall clock for frames per second. OpenCV runs on one thread inside each worker, so
/// the worker count is the whole parallelism.
/// </summary>
internal sealed class BenchRunner
{
    private const string StreamKey = "bench-stream";

    private readonly BenchRequest request;
    private readonly TextWriter stderr;

    public BenchRunner(BenchRequest request, TextWriter stderr)
    {
        this.request = request;
        this.stderr = stderr;
    }

    /// <summary>Default for <see cref="BenchRequest.MemoryBudgetBytes"/>: most bytes the decoded frames and their resized copies may take together (frames beyond are not decoded).</summary>
    public const long MemoryBudgetBytes = 1L << 30;

    public BenchResult Run()
    {
        MachineInfo machine = MachineInfo.Collect();
        Cv2.SetNumThreads(1);
        var frames = new List<(string Key, Mat Frame)>();
        try
        {
            TimingStats decode;
            string source;
            if (request.FramesPath is string path)
            {
                decode = Decode(path, frames);
                source = "frames";
            }
            else
            {
                decode = RenderAndDecode(frames);
                source = "render";
            }

            var runs = new List<BenchRun>();
            IReadOnlyList<(int Width, int Height)> sizes = request.Sizes.Count > 0 ? request.Sizes : [(frames[0].Frame.Cols, frames[0].Frame.Rows)];
            foreach ((int w, int h) in sizes)
            {
                var sized = new Mat[frames.Count];
                try
                {
                    for (int i = 0; i < frames.Count; i++)
                    {
                        sized[i] = new Mat();
                        Mat f = frames[i].Frame;
                        if (f.Cols == w && f.Rows == h)
                        {
                            f.CopyTo(sized[i]);
                        }
                        else
                        {
                            Cv2.Resize(f, sized[i], new Size(w, h), 0, 0, w < f.Cols ? InterpolationFlags.Area : InterpolationFlags.Linear);
                        }
                    }

                    foreach (int workers in request.Threads)
                    {
                        stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"bench: {w}x{h}, {workers} worker(s), {frames.Count} frames x {request.Passes} passes"));
                        runs.Add(Measure(w, h, workers, frames.Select(f => f.Key).ToArray(), sized));
                    }
                }
                finally
                {
                    foreach (Mat? m in sized)
                    {
                        m?.Dispose();
                    }
                }
            }

            return new BenchResult
            {
                Machine = machine,
                Source = source,
                FramesPath = request.FramesPath,
                Seed = request.FramesPath is null ? request.Seed : null,
                FrameKeys = frames.Select(f => f.Key).ToArray(),
                SourceWidth = frames[0].Frame.Cols,
                SourceHeight = frames[0].Frame.Rows,
                Decode = decode,
                Config = request.ConfigSource,
                Warmup = request.Warmup,
                Passes = request.Passes,
                Runs = runs,
            };
        }
        finally
        {
            foreach ((_, Mat m) in frames)
            {
                m.Dispose();
            }
        }
    }

    private TimingStats Decode(string path, List<(string Key, Mat Frame)> frames)
    {
        var decodeMs = new List<double>();
        if (FrameListing.IsVideo(path))
        {
            if (!File.Exists(path))
            {
                throw BadInputException.At(path, 0, null, "no such video file");
            }

            using var reader = new VideoFrameReader(path, request.Options.Limits);
            while (frames.Count < request.MaxFrames && WithinBudget(frames))
            {
                long t0 = Stopwatch.GetTimestamp();
                if (!reader.TryRead(out Mat frame, out FrameItem item))
                {
                    break;
                }

                decodeMs.Add(Stopwatch.GetElapsedTime(t0).TotalMilliseconds);
                frames.Add((item.Key, frame));
            }

            if (frames.Count == 0)
            {
                throw BadInputException.At(path, 0, null, "the video holds no frame");
            }
        }
        else
        {
            foreach (FrameItem item in FrameListing.ListImages(path).Take(request.MaxFrames))
            {
                if (!WithinBudget(frames))
                {
                    break;
                }

                long t0 = Stopwatch.GetTimestamp();
                Mat frame = FrameLoader.Load(item.Path!, request.Options.Limits);
                decodeMs.Add(Stopwatch.GetElapsedTime(t0).TotalMilliseconds);
                frames.Add((item.Key, frame));
            }
        }

        if (frames.Count < request.MaxFrames && !WithinBudget(frames))
        {
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"bench: {frames.Count} frames kept within the {request.MemoryBudgetBytes >> 20} MiB memory budget for decoded and resized frames"));
        }

        return TimingStats.From(decodeMs);
    }

    /// <summary>Whether one more frame like those held fits the memory budget (decoded frame plus its copy at the largest size).</summary>
    private bool WithinBudget(List<(string Key, Mat Frame)> frames)
    {
        if (frames.Count == 0)
        {
            return true;
        }

        long largest = request.Sizes.Count > 0 ? request.Sizes.Max(s => (long)s.Width * s.Height * 3) : 0;
        long perFrame = frames.Max(f => (long)f.Frame.Total() * f.Frame.ElemSize());
        long copy = Math.Max(largest, perFrame);
        return (frames.Count + 1) * (perFrame + copy) <= request.MemoryBudgetBytes;
    }

    private TimingStats RenderAndDecode(List<(string Key, Mat Frame)> frames)
    {
        (int w, int h) = request.Sizes.Count > 0 ? request.Sizes.MaxBy(s => (long)s.Width * s.Height) : (1280, 720);
        int count = (int)Math.Clamp(request.MemoryBudgetBytes / (2L * w * h * 3), 1, request.RenderCount); // no more scenes than the frames kept
        string dir = Path.Combine(Path.GetTempPath(), "lanebaseline-bench-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture) + "-" + Guid.NewGuid().ToString("N")[..8]);
        try
        {
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"bench: rendering {count} scenes at {w}x{h} (seed {request.Seed})"));
            RenderJob.Run(
                new RenderJobOptions { OutDir = dir, Seed = request.Seed, Count = count, Camera = CameraModel.CreateDefault(w, h), Threads = 1 },
                null);
            return Decode(dir, frames);
        }
        finally
        {
            try
            {
                Directory.Delete(dir, recursive: true);
            }
            catch (IOException)
            {
            }
        }
    }

    private BenchRun Measure(int width, int height, int workers, string[] keys, Mat[] frames)
    {
        var recorders = new WorkerRecord[workers];
        var threads = new Thread[workers];
        using var ready = new Barrier(workers);
        Exception? failure = null;
        for (int t = 0; t < workers; t++)
        {
            int worker = t;
            int[] part = Enumerable.Range(0, frames.Length).Where(i => i % workers == worker).ToArray();
            recorders[t] = new WorkerRecord(part.Length * request.Passes);
            threads[t] = new Thread(() =>
            {
                try
                {
                    RunWorker(part, frames, recorders[worker], ready);
                }
#pragma warning disable CA1031 // rethrown on the calling thread below
                catch (Exception ex)
#pragma warning restore CA1031
                {
                    Interlocked.CompareExchange(ref failure, ex, null);
                    if (!recorders[worker].Signalled)
                    {
                        ready.RemoveParticipant();
                    }
                }
            })
            {
                IsBackground = true,
                Name = "bench-worker-" + worker.ToString(CultureInfo.InvariantCulture),
            };
        }

        foreach (Thread th in threads)
        {
            th.Start();
        }

        foreach (Thread th in threads)
        {
            th.Join();
        }

        if (failure is not null)
        {
            if (failure is BadInputException)
            {
                throw failure;
            }

            throw new InvalidOperationException("bench worker failed: " + failure.Message, failure);
        }

        string[] stageNames = recorders.Select(r => r.StageNames).FirstOrDefault(n => n.Length > 0) ?? [];
        var pipeline = recorders.SelectMany(r => r.PipelineMs).ToArray();
        var floor = recorders.SelectMany(r => r.FloorMs).ToArray();
        var ratios = recorders.SelectMany(r => r.PipelineMs.Zip(r.FloorMs, (p, f) => f > 0 ? p / f : double.NaN)).Where(double.IsFinite).ToArray();
        var stages = new List<NamedTiming>();
        for (int s = 0; s < stageNames.Length; s++)
        {
            stages.Add(new NamedTiming(stageNames[s], TimingStats.From(recorders.SelectMany(r => r.StageMs.Select(row => row[s])).ToArray())));
        }

        var primitives = new List<NamedTiming>();
        for (int p = 0; p < FloorPrimitives.Names.Count; p++)
        {
            primitives.Add(new NamedTiming(FloorPrimitives.Names[p], TimingStats.From(recorders.SelectMany(r => r.PrimitiveMs.Select(row => row[p])).ToArray())));
        }

        long start = recorders.Where(r => r.ThroughputFrames > 0).Select(r => r.ThroughputStart).DefaultIfEmpty(0).Min();
        long end = recorders.Where(r => r.ThroughputFrames > 0).Select(r => r.ThroughputEnd).DefaultIfEmpty(0).Max();
        double wallSeconds = Stopwatch.GetElapsedTime(start, end).TotalSeconds;
        int throughputFrames = recorders.Sum(r => r.ThroughputFrames);
        long[] allocated = recorders.SelectMany(r => r.AllocatedBytes).ToArray();
        TimingStats pipelineStats = TimingStats.From(pipeline);
        TimingStats floorStats = TimingStats.From(floor);
        return new BenchRun
        {
            Width = width,
            Height = height,
            Workers = workers,
            Stages = stages,
            Pipeline = pipelineStats,
            FloorPrimitives = primitives,
            Floor = floorStats,
            RatioMedianOfPairs = TimingStats.From(ratios).Median,
            RatioOfMedians = floorStats.Median > 0 ? pipelineStats.Median / floorStats.Median : double.NaN,
            FramesPerSecond = wallSeconds > 0 ? throughputFrames / wallSeconds : double.NaN,
            AllocatedBytesPerFrame = allocated.Length > 0 ? allocated.Average() : 0,
            MaxAllocatedBytesPerFrame = allocated.Length > 0 ? allocated.Max() : 0,
            PeakRssBytes = MachineInfo.ReadRss().PeakBytes,
            PipelineFrameKeys = recorders.SelectMany(r => r.PipelineKeys.Select(i => keys[i])).ToArray(),
            FloorFrameKeys = recorders.SelectMany(r => r.FloorKeys.Select(i => keys[i])).ToArray(),
        };
    }

    private void RunWorker(int[] part, Mat[] frames, WorkerRecord record, Barrier ready)
    {
        using var pipeline = new LanePipeline(request.Options) { MeasureStages = true };
        using var floor = new FloorPrimitives(request.Options.Limits.WorkingWidthPx);
        // The bench plays its frames as one stream at 10 frames/s (one sequence: tracking never restarts).
        var runner = new FrameSequenceRunner(pipeline, _ => throw new InvalidOperationException("bench frames are decoded up front"));
        if (part.Length > 0)
        {
            for (int k = 0; k < request.Warmup; k++)
            {
                Mat frame = frames[part[k % part.Length]];
                runner.Process(new FrameItem(k, StreamKey, null, k * 0.1), frame);
                floor.Measure(frame);
            }

            record.StageNames = [.. pipeline.StageNames];
            int n = 0;
            for (int pass = 0; pass < request.Passes; pass++)
            {
                foreach (int i in part)
                {
                    Mat frame = frames[i];
                    double timestamp = (request.Warmup + n) * 0.1;

                    // A/B alternation: even calls run the pipeline first, odd calls the floor first, so cache warmth
                    // and clock drift fall on both sides equally.
                    if (n % 2 == 0)
                    {
                        RunPipeline(runner, frame, timestamp, i, record);
                        RunFloor(floor, frame, i, record);
                    }
                    else
                    {
                        RunFloor(floor, frame, i, record);
                        RunPipeline(runner, frame, timestamp, i, record);
                    }

                    n++;
                }
            }
        }

        record.Signalled = true;
        ready.SignalAndWait();
        if (part.Length == 0)
        {
            return;
        }

        pipeline.MeasureStages = false;
        record.ThroughputStart = Stopwatch.GetTimestamp();
        double ts = 0;
        foreach (int i in part)
        {
            runner.Process(new FrameItem(i, StreamKey, null, ts += 0.1), frames[i]);
        }

        record.ThroughputEnd = Stopwatch.GetTimestamp();
        record.ThroughputFrames = part.Length;
    }

    private static void RunPipeline(FrameSequenceRunner runner, Mat frame, double timestamp, int index, WorkerRecord record)
    {
        var item = new FrameItem(index, StreamKey, null, timestamp);
        long bytes0 = GC.GetAllocatedBytesForCurrentThread();
        long t0 = Stopwatch.GetTimestamp();
        runner.Process(item, frame);
        double ms = Stopwatch.GetElapsedTime(t0).TotalMilliseconds;
        long bytes = GC.GetAllocatedBytesForCurrentThread() - bytes0;
        record.PipelineMs.Add(ms);
        record.AllocatedBytes.Add(bytes);
        record.StageMs.Add([.. runner.Pipeline.LastStageMs]);
        record.PipelineKeys.Add(index);
    }

    private static void RunFloor(FloorPrimitives floor, Mat frame, int index, WorkerRecord record)
    {
        (double hls, double warp) = floor.Measure(frame);
        record.FloorMs.Add(hls + warp);
        record.PrimitiveMs.Add([hls, warp]);
        record.FloorKeys.Add(index);
    }

    /// <summary>One worker's samples, preallocated so recording adds no work inside the timed calls.</summary>
    private sealed class WorkerRecord(int capacity)
    {
        public string[] StageNames { get; set; } = [];

        public List<double> PipelineMs { get; } = new(capacity);

        public List<double[]> StageMs { get; } = new(capacity);

        public List<long> AllocatedBytes { get; } = new(capacity);

        public List<double> FloorMs { get; } = new(capacity);

        public List<double[]> PrimitiveMs { get; } = new(capacity);

        public List<int> PipelineKeys { get; } = new(capacity);

        public List<int> FloorKeys { get; } = new(capacity);

        public long ThroughputStart { get; set; }

        public long ThroughputEnd { get; set; }

        public int ThroughputFrames { get; set; }

        public bool Signalled { get; set; }
    }
}
