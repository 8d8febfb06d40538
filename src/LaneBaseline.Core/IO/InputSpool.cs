using System.Globalization;

namespace LaneBaseline.Core.IO;

/// <summary>
/// The one mechanism that makes inputs that can be read only once readable as often as a command needs: standard
/// input given as <c>-</c> (<see cref="Input"/>), and pipes such as <c>&lt;(cat t.lanes.jsonl)</c>, FIFOs and
/// <c>/dev/stdin</c> given by path (<see cref="ReadablePath"/>). The first use copies the stream to a private
/// temporary file (mode 0600, tracked by <see cref="TemporaryFiles"/> so Ctrl-C removes it), and every later use reads
/// that copy. A command opens a scope with <see cref="Begin"/>; disposing it deletes the copies. Messages name the
/// input as given: a path as is, standard input as <c>-</c> (<see cref="Display"/> replaces the copy's name).
/// Without a scope, or for regular files, paths are returned unchanged.
/// </summary>
public sealed class InputSpool : IDisposable
{
    private static readonly AsyncLocal<InputSpool?> Current = new();
    private readonly Dictionary<string, string> copies = new(StringComparer.Ordinal);
    private readonly Lock gate = new();
    private readonly InputSpool? previous;
    private bool disposed;
    private string? stdinCopy;

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

    /// <summary>
    /// Returns <paramref name="path"/>, or for <c>-</c> the copy of all of standard input (made on first use; an
    /// OpenLABEL document is named <c>*.json</c> and anything else <c>*.lanes.jsonl</c>, as the readers choose the
    /// format by name).
    /// </summary>
    /// <exception cref="InvalidOperationException"><c>-</c> outside a scope.</exception>
    public static string Input(string path) =>
        StandardStreams.IsDash(path) ? (Current.Value ?? throw new InvalidOperationException("standard input is read inside a command's scope only")).CopyStdin() : path;

    /// <summary>Whether the current scope read standard input.</summary>
    public static bool ReadStdin => Current.Value?.stdinCopy is not null;

    /// <summary><paramref name="text"/> with the current scope's temporary copies named as given (<c>-</c> for standard input).</summary>
    public static string Display(string text) => Current.Value is { } spool ? spool.Clean(text) : text;

    /// <summary><paramref name="text"/> with this scope's temporary copies named as given (<c>-</c> for standard input).</summary>
    public string Clean(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        lock (gate)
        {
            if (stdinCopy is not null)
            {
                text = text.Replace(stdinCopy, StandardStreams.Dash, StringComparison.Ordinal);
            }

            foreach (KeyValuePair<string, string> kv in copies)
            {
                text = text.Replace(kv.Value, kv.Key, StringComparison.Ordinal);
            }

            return text;
        }
    }

    private string CopyStdin()
    {
        lock (gate)
        {
            ObjectDisposedException.ThrowIf(disposed, this);
            if (stdinCopy is not null)
            {
                return stdinCopy;
            }

            string spool = NewTemporary(".tmp");
            copies[StandardStreams.Dash] = spool;
            Copy(StandardStreams.Input, spool, StandardStreams.Dash);

            // The readers choose the format by name: an OpenLABEL document says so near its start, a lane file does not.
            byte[] head = new byte[512];
            int n;
            using (FileStream read = File.OpenRead(spool))
            {
                n = read.ReadAtLeast(head, head.Length, throwOnEndOfStream: false);
            }

            string named = Path.ChangeExtension(spool, head.AsSpan(0, n).IndexOf("\"openlabel\""u8) >= 0 ? ".json" : ".lanes.jsonl");
            TemporaryFiles.Track(named);
            File.Move(spool, named);
            TemporaryFiles.Forget(spool);
            copies[StandardStreams.Dash] = named;
            stdinCopy = named;
            return named;
        }
    }

    private static string NewTemporary(string extension)
    {
        string path = Path.Combine(Path.GetTempPath(), "lanebaseline-input-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture) + "-" + Guid.NewGuid().ToString("N")[..12] + extension);
        TemporaryFiles.Track(path);
        return path;
    }

    private static void Copy(Stream source, string copy, string name)
    {
        try
        {
            var create = new FileStreamOptions { Mode = FileMode.CreateNew, Access = FileAccess.Write, Share = FileShare.None, BufferSize = 1 << 16 };
            if (!OperatingSystem.IsWindows())
            {
                create.UnixCreateMode = UnixFileMode.UserRead | UnixFileMode.UserWrite;
            }

            using var target = new FileStream(copy, create);
            source.CopyTo(target);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(name, 0, null, "cannot be read: " + ex.Message);
        }
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

            copy = NewTemporary(".tmp");
            copies.Add(path, copy);
            FileStream source;
            try
            {
                source = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, 1 << 16);
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
            {
                throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
            }

            using (source)
            {
                Copy(source, copy, path);
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
