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

/// <summary>Detect, part 2: the frames to process (listing, shard and resume filters, video decoding) and one frame through the pipeline.</summary>
internal sealed partial class DetectRunner
{
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
                    ExtraJson = extraJson,
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
}
