using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// Links each frame to the earlier frames of its sequence that the temporal rules (<see cref="AuditRuleFamily.Temporal"/>)
/// compare it with. A frame key ending in a number (<c>seq/000123.png</c>, <c>clip.mp4#000123</c>) belongs to the
/// sequence named by everything before the number (<see cref="SequenceKey"/>); frames of one sequence are consecutive
/// when their numbers differ by one. Only the last two frames are kept. Not thread-safe; feed frames in file order.
/// </summary>
public sealed class TemporalWindow
{
    private (AuditFrame Frame, (string Name, long Number)? Sequence)? older;
    private (AuditFrame Frame, (string Name, long Number)? Sequence)? previous;

    /// <summary>
    /// Takes the next frame and sets its <see cref="AuditFrame.Previous"/> (the frame before, when it is of the same
    /// sequence with a smaller number), <see cref="AuditFrame.Step"/> and <see cref="AuditFrame.Older"/> (when the three
    /// are consecutive).
    /// </summary>
    public void Push(AuditFrame frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        (string Name, long Number)? sequence = SequenceKey.Parse(frame.Record.Frame);
        if (previous is { } p && sequence is { } s && p.Sequence is { } ps && s.Name == ps.Name && s.Number > ps.Number)
        {
            frame.Previous = p.Frame;
            frame.Step = s.Number - ps.Number;
            if (frame.Step == 1 && older is { } o && o.Sequence is { } os && os.Name == s.Name && ps.Number - os.Number == 1)
            {
                frame.Older = o.Frame;
            }
        }

        // Only this frame and the one before stay reachable: drop the links of the frames that leave the window.
        if (older is { } gone)
        {
            gone.Frame.Previous = null;
            gone.Frame.Older = null;
        }

        if (previous is { } kept)
        {
            kept.Frame.Older = null;
        }

        older = previous;
        previous = (frame, sequence);
    }

    /// <summary>
    /// Forgets the frames seen so far, as if a frame of another sequence came next: a sharded audit calls it for every
    /// frame of another shard, so the findings on the frames it keeps equal those of an unsharded run.
    /// </summary>
    public void Break()
    {
        older = null;
        previous = null;
    }
}
