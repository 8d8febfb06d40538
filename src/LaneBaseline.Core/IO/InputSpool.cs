using System.Globalization;

namespace LaneBaseline.Core.IO;

/// <summary>
/// Makes inputs that can be read only once (a pipe such as <c>&lt;(cat t.lanes.jsonl)</c>, a FIFO, <c>/dev/stdin</c>)
/// readable as often as a command needs: the first open copies the stream to a private temporary file, and every
/// later open of the same path reads that copy. A command opens a scope with <see cref="Begin"/>; readers ask
/// <see cref="ReadablePath"/> for the path to open (the path as given stays the name in messages). Disposing the scope
/// deletes the copies. Without a scope, or for regular files, the path is returned unchanged.
/// </summary>
public sealed class InputSpool : IDisposable
{
    private static readonly AsyncLocal<InputSpool?> Current = new();
    private readonly Dictionary<string, string> copies = new(StringComparer.Ordinal);
    private readonly Lock gate = new();
    private readonly InputSpool? previous;
    private bool disposed;

    private InputSpool(InputSpool? previous) => this.previous = previous;

    /// <summary>Temporary copies made so far (for tests and cleanup checks).</summary>
    public IReadOnlyCollection<string> Copies
    {
        get
        {
            lock (gate)
            {
                return [.. copies.Values];
            }
        }
    }

    /// <summary>Starts a scope for the current command (nested scopes restore the outer one on dispose).</summary>
    public static InputSpool Begin()
    {
        var spool = new InputSpool(Current.Value);
        Current.Value = spool;
        return spool;
    }

    /// <summary>The path to open for reading <paramref name="path"/>: a temporary copy when it is a one-shot stream.</summary>
    public static string ReadablePath(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        InputSpool? spool = Current.Value;
        if (spool is null || FileIdentity.Of(path) is not { IsStream: true })
        {
            return path;
        }

        return spool.CopyOf(path);
    }

    private string CopyOf(string path)
    {
        lock (gate)
        {
            ObjectDisposedException.ThrowIf(disposed, this);
            if (copies.TryGetValue(path, out string? copy))
            {
                return copy;
            }

            copy = Path.Combine(Path.GetTempPath(), "lanebaseline-input-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture) + "-" + Guid.NewGuid().ToString("N")[..12] + ".tmp");
            copies.Add(path, copy);
            TemporaryFiles.Track(copy);
            try
            {
                var create = new FileStreamOptions { Mode = FileMode.CreateNew, Access = FileAccess.Write, Share = FileShare.None, BufferSize = 1 << 16 };
                if (!OperatingSystem.IsWindows())
                {
                    create.UnixCreateMode = UnixFileMode.UserRead | UnixFileMode.UserWrite;
                }

                using var source = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, 1 << 16);
                using var target = new FileStream(copy, create);
                source.CopyTo(target);
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
            {
                throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
            }

            return copy;
        }
    }

    /// <inheritdoc/>
    public void Dispose()
    {
        lock (gate)
        {
            if (disposed)
            {
                return;
            }

            disposed = true;
            foreach (string copy in copies.Values)
            {
                try
                {
                    File.Delete(copy);
                    TemporaryFiles.Forget(copy);
                }
                catch (IOException)
                {
                }
            }
        }

        if (Current.Value == this)
        {
            Current.Value = previous;
        }
    }
}
