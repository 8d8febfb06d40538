namespace LaneBaseline.Vision.Pipeline;

/// <summary>One step of the pipeline: built once per stream with immutable options, run once per frame.</summary>
public interface IFrameStage : IDisposable
{
    /// <summary>Stable identifier used in timings, stage sheets and reports.</summary>
    string Name { get; }

    /// <summary>Reads and writes the workspace buffers of the current frame; allocates nothing that can be reused.</summary>
    void Process(FrameWorkspace workspace);
}
