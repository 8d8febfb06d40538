using System.Collections.Concurrent;

namespace LaneBaseline.Core.IO;

/// <summary>
/// Every temporary file the process has open (output temporaries, spooled inputs), so an interrupt that has to end
/// the process before the writers unwind (a second Ctrl-C, or a command that does not stop in time) can still
/// remove them.
/// </summary>
public static class TemporaryFiles
{
    private static readonly ConcurrentDictionary<string, byte> Live = new(StringComparer.Ordinal);

    /// <summary>Records a temporary that exists until <see cref="Forget"/>.</summary>
    public static void Track(string path) => Live.TryAdd(path, 0);

    /// <summary>The temporary was renamed or deleted by its owner.</summary>
    public static void Forget(string path) => Live.TryRemove(path, out _);

    /// <summary>Deletes every tracked temporary (best effort); returns how many were deleted.</summary>
    public static int DeleteAll()
    {
        int n = 0;
        foreach (string path in Live.Keys)
        {
            try
            {
                if (File.Exists(path))
                {
                    File.Delete(path);
                    n++;
                }
            }
            catch (IOException)
            {
            }
            catch (UnauthorizedAccessException)
            {
            }

            Live.TryRemove(path, out _);
        }

        return n;
    }
}
