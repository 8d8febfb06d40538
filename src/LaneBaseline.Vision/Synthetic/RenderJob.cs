using System.Collections.Concurrent;
using System.Globalization;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.IO;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Renders a data set: frames, <c>truth.lanes.jsonl</c> and <c>camera.json</c>, deterministically.</summary>
public static class RenderJob
{
    private sealed record FrameJob(SceneSpec Scene, int FrameIndex, string Key, IReadOnlyList<string> ExtraTags);

    /// <summary>One worker's renderer and frame buffer, reused for every frame it renders.</summary>
    private sealed class Worker : IDisposable
    {
        public Worker(CameraModel camera)
        {
            Renderer = new SceneRenderer(camera);
        }

        public SceneRenderer Renderer { get; }

        public Mat Frame { get; } = new Mat();

        public void Dispose()
        {
            Renderer.Dispose();
            Frame.Dispose();
        }
    }

    /// <summary>Runs the job; <paramref name="progress"/> receives (done, total) after every batch.</summary>
    /// <returns>The number of frames written.</returns>
    public static int Run(RenderJobOptions options, Action<int, int>? progress, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(options);
        List<FrameJob> jobs = PlanFrames(options);
        Directory.CreateDirectory(options.OutDir);
        if (options.OverlayDir is not null)
        {
            Directory.CreateDirectory(options.OverlayDir);
        }

        options.Camera.Save(Path.Combine(options.OutDir, "camera.json"));
        string truthPath = Path.Combine(options.OutDir, "truth.lanes.jsonl");
        var pool = new ConcurrentBag<Worker>();
        try
        {
            using var truthFile = new AtomicFile(truthPath);
            using (var writer = new LaneFileWriter(truthFile.Stream, leaveOpen: true) { FlushEachRecord = false })
            {
                int batch = Math.Max(1, options.Threads) * 4;
                var results = new LaneRecord[batch];
                for (int start = 0; start < jobs.Count; start += batch)
                {
                    cancellationToken.ThrowIfCancellationRequested();
                    int n = Math.Min(batch, jobs.Count - start);
                    Parallel.For(
                        0,
                        n,
                        new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, options.Threads), CancellationToken = cancellationToken },
                        k => results[k] = RenderOne(options, jobs[start + k], pool));
                    for (int k = 0; k < n; k++)
                    {
                        writer.Write(results[k]);
                    }

                    progress?.Invoke(start + n, jobs.Count);
                }
            }

            truthFile.Commit();
        }
        finally
        {
            while (pool.TryTake(out Worker? w))
            {
                w.Dispose();
            }
        }

        return jobs.Count;
    }

    private static LaneRecord RenderOne(RenderJobOptions options, FrameJob job, ConcurrentBag<Worker> pool)
    {
        if (!pool.TryTake(out Worker? worker))
        {
            worker = new Worker(options.Camera);
        }

        try
        {
            Mat frame = worker.Frame;
            RenderedFrame truth = worker.Renderer.Render(job.Scene, job.FrameIndex, frame);
            string path = Path.Combine(options.OutDir, job.Key.Replace('/', Path.DirectorySeparatorChar));
            Directory.CreateDirectory(Path.GetDirectoryName(path)!);
            string ext = options.Format == "png" ? ".png" : ".jpg";
            ImageEncodingParam[] prms = options.Format == "png"
                ? [new ImageEncodingParam(ImwriteFlags.PngCompression, 6)]
                : [new ImageEncodingParam(ImwriteFlags.JpegQuality, options.JpegQuality)];
            Cv2.ImEncode(ext, frame, out byte[] bytes, prms);
            AtomicFile.WriteAllBytes(path, bytes);
            if (options.OverlayDir is not null)
            {
                TruthOverlay.Draw(frame, truth.Lanes);
                string overlay = Path.Combine(options.OverlayDir, Path.ChangeExtension(job.Key, ".png").Replace('/', Path.DirectorySeparatorChar));
                Cv2.ImEncode(".png", frame, out byte[] png);
                AtomicFile.WriteAllBytes(overlay, png);
            }

            var tags = new List<string>(truth.Tags);
            if (job.ExtraTags.Count > 0)
            {
                tags.Remove("clean");
                foreach (string t in job.ExtraTags)
                {
                    if (!tags.Contains(t, StringComparer.Ordinal))
                    {
                        tags.Insert(0, t);
                    }
                }
            }

            return new LaneRecord { Frame = job.Key, Width = options.Camera.ImageWidth, Height = options.Camera.ImageHeight, Tags = tags, Lanes = truth.Lanes };
        }
        finally
        {
            pool.Add(worker);
        }
    }

    private static List<FrameJob> PlanFrames(RenderJobOptions o)
    {
        string ext = o.Format == "png" ? "png" : "jpg";
        var jobs = new List<FrameJob>();
        if (o.Sweep is not null)
        {
            foreach (double sev in RenderJobOptions.SweepSeverities)
            {
                string sevText = sev.ToString("0.00", CultureInfo.InvariantCulture);
                IReadOnlyList<string> extra = [o.Sweep, "severity=" + sevText];
                for (int i = 0; i < o.Count; i++)
                {
                    SceneSpec scene = SceneSpec.Create(o.Seed, i, [new RenderCondition(o.Sweep, sev)], o.SequenceLength, o.FramesPerSecond);
                    for (int f = 0; f < o.SequenceLength; f++)
                    {
                        jobs.Add(new FrameJob(scene, f, FormattableString.Invariant($"sev-{sevText}/lap-{i:D4}/t{f:D4}.{ext}"), extra));
                    }
                }
            }

            return jobs;
        }

        for (int i = 0; i < o.Count; i++)
        {
            SplitMix64 rng = SplitMix64.ForStream(o.Seed ^ 0x5EEDC0DEUL, (ulong)i);
            var conditions = new List<RenderCondition>();
            if (o.Conditions is null)
            {
                int k = i % (KnownConditions.All.Count + 1);
                double sev = o.Severity ?? Math.Round(rng.NextDouble(0.4, 1.0), 2);
                if (k > 0)
                {
                    conditions.Add(new RenderCondition(KnownConditions.All[k - 1], sev));
                }
            }
            else
            {
                foreach (string name in o.Conditions)
                {
                    conditions.Add(new RenderCondition(name, o.Severity ?? Math.Round(rng.NextDouble(0.3, 1.0), 2)));
                }
            }

            SceneSpec scene = SceneSpec.Create(o.Seed, i, conditions, o.SequenceLength, o.FramesPerSecond);
            for (int f = 0; f < o.SequenceLength; f++)
            {
                jobs.Add(new FrameJob(scene, f, FormattableString.Invariant($"lap-{i:D4}/t{f:D4}.{ext}"), []));
            }
        }

        return jobs;
    }
}
