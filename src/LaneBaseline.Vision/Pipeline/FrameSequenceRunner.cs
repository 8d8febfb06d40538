using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Vision.IO;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// Runs one <see cref="LanePipeline"/> over the frames of a stream, in order: decodes a frame that the source did not
/// decode, restarts tracking whenever the frame's sequence (<see cref="SequenceKey"/>) differs from the previous
/// frame's, hands the pipeline the frame's timestamp and returns its finished lanes. The one loop body of detect, tune
/// and bench, so they cannot disagree about where a sequence starts. Not thread-safe: one per worker.
/// </summary>
public sealed class FrameSequenceRunner
{
    private readonly Func<FrameItem, Mat> decode;
    private readonly Action<FrameItem, Mat>? check;
    private string? lastKey;
    private string? sequence;

    /// <summary>Creates a runner on a pipeline it borrows.</summary>
    /// <param name="pipeline">The worker's pipeline.</param>
    /// <param name="decode">Decodes a frame that arrives without pixels; the runner disposes what it returns.</param>
    /// <param name="check">Checks every frame's pixels before processing (throws on bad input), or null.</param>
    public FrameSequenceRunner(LanePipeline pipeline, Func<FrameItem, Mat> decode, Action<FrameItem, Mat>? check = null)
    {
        ArgumentNullException.ThrowIfNull(pipeline);
        ArgumentNullException.ThrowIfNull(decode);
        Pipeline = pipeline;
        this.decode = decode;
        this.check = check;
    }

    /// <summary>Time the pipeline took on the last frame (decoding excluded).</summary>
    public TimeSpan LastPipelineTime { get; private set; }

    /// <summary>The pipeline (for stage names, stage timings and the workspace of the last frame).</summary>
    public LanePipeline Pipeline { get; }

    /// <summary>
    /// Processes the next frame of the stream at <see cref="FrameItem.TimestampSeconds"/>.
    /// </summary>
    /// <param name="item">The frame.</param>
    /// <param name="decoded">Its pixels when the source decoded them (borrowed), else null to decode them here.</param>
    /// <param name="whileDecoded">Called with the frame's pixels and result before decoded pixels are released (overlays).</param>
    public FrameResult Process(FrameItem item, Mat? decoded, Action<Mat, FrameResult>? whileDecoded = null)
    {
        ArgumentNullException.ThrowIfNull(item);
        Mat? own = decoded is null ? decode(item) : null;
        try
        {
            Mat frame = own ?? decoded!;
            check?.Invoke(item, frame);
            if (!ReferenceEquals(item.Key, lastKey))
            {
                string current = SequenceKey.Of(item.Key);
                if (sequence is not null && current != sequence)
                {
                    Pipeline.ResetSequence();
                }

                sequence = current;
                lastKey = item.Key;
            }

            long t0 = System.Diagnostics.Stopwatch.GetTimestamp();
            FrameResult result = Pipeline.Process(frame, item.TimestampSeconds);
            LastPipelineTime = System.Diagnostics.Stopwatch.GetElapsedTime(t0);
            whileDecoded?.Invoke(frame, result);
            return result;
        }
        finally
        {
            own?.Dispose();
        }
    }
}
