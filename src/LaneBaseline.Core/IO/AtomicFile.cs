using System.Text;

namespace LaneBaseline.Core.IO;

/// <summary>
/// The one way every command writes an output file: through a temporary sibling (<c>OUT.tmp</c>) that is renamed into
/// place on <see cref="Commit"/>, so an error or interruption never leaves a half-written output (disposing without
/// committing deletes the temporary). A missing output folder is created. A symbolic link is followed and its final
/// target replaced (the link stays). An existing output that is not a regular file (FIFO, character device, or a link
/// to one) is written in place and never renamed over. The path <c>-</c> is standard output
/// (<see cref="StandardStreams"/>): written as it goes and flushed on <see cref="Commit"/>, never closed. The temporary is held under an exclusive lock until it is
/// renamed, so a second process writing the same output fails at once with a <see cref="BadInputException"/>
/// instead of interleaving with the first.
/// </summary>
public sealed class AtomicFile : IDisposable
{
    /// <summary>The suffix of the temporary sibling.</summary>
    public const string TempSuffix = ".tmp";

    private const int BufferSize = 1 << 16;
    private const int SharingViolation = 32, LockViolation = 33, WouldBlock = 11; // Windows errors; Linux EWOULDBLOCK from flock
    private readonly string finalPath;
    private readonly string? tempPath;
    private readonly bool standardOutput;
    private FileStream? stream;
    private Stream? stdout; // standard output for the path '-': borrowed, never disposed
    private StreamWriter? writer;
    private bool committed;

    /// <summary>Opens the output <paramref name="path"/> for writing.</summary>
    public AtomicFile(string path)
        : this(path, resume: false)
    {
    }

    private AtomicFile(string path, bool resume)
    {
        if (StandardStreams.IsDash(path))
        {
            finalPath = path;
            standardOutput = true;
            stdout = StandardStreams.Output;
            return;
        }

        OutputTarget target = OutputTarget.Resolve(path);
        OutputTarget.RefuseFolder(path, target.Path);
        finalPath = target.Path;
        if (target.InPlace)
        {
            stream = new FileStream(finalPath, resume ? FileMode.Append : FileMode.Open, FileAccess.Write, FileShare.ReadWrite, BufferSize);
            return;
        }

        if (Directory.Exists(finalPath))
        {
            throw BadInputException.At(path, 0, null, "is a directory, expected an output file");
        }

        string? dir = Path.GetDirectoryName(finalPath);
        if (dir is not null)
        {
            Directory.CreateDirectory(dir);
        }

        tempPath = finalPath + TempSuffix;
        stream = OpenLocked(path, tempPath);
        TemporaryFiles.Track(tempPath);
        if (!resume)
        {
            stream.SetLength(0);
        }
        else
        {
            if (stream.Length == 0 && File.Exists(finalPath))
            {
                // Continue the existing output: copy it into the locked temporary, which is renamed over it at the end.
                using var old = new FileStream(finalPath, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, BufferSize);
                old.CopyTo(stream);
            }

            stream.Seek(0, SeekOrigin.End);
        }
    }

    /// <summary>The final path written on <see cref="Commit"/> (links resolved).</summary>
    public string FinalPath => finalPath;

    /// <summary>The temporary sibling written until <see cref="Commit"/>, or null when the output is written in place.</summary>
    public string? TempPath => tempPath;

    /// <summary>The stream to write (owned by this object).</summary>
    public Stream Stream => (Stream?)stream ?? stdout ?? throw new ObjectDisposedException(nameof(AtomicFile));

    /// <summary>A UTF-8 (no BOM) text writer on <see cref="Stream"/>, owned by this object.</summary>
    public TextWriter Writer => writer ??= new StreamWriter(Stream, new UTF8Encoding(false), BufferSize, leaveOpen: true);

    /// <summary>
    /// Opens <paramref name="path"/> to be continued: the stream (readable and writable, positioned at its end) starts
    /// with what a run killed before its rename left in the temporary, or else with the existing output's bytes.
    /// Every record written since is lost only when the process dies; on <see cref="Commit"/> the whole is renamed
    /// into place.
    /// </summary>
    public static AtomicFile Resume(string path) => new(path, resume: true);

    /// <summary>Writes <paramref name="bytes"/> as the whole file, atomically.</summary>
    public static void WriteAllBytes(string path, ReadOnlySpan<byte> bytes)
    {
        using var file = new AtomicFile(path);
        file.Stream.Write(bytes);
        file.Commit();
    }

    /// <summary>Writes <paramref name="text"/> as UTF-8 without a byte-order mark, atomically.</summary>
    public static void WriteAllText(string path, string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        WriteAllBytes(path, new UTF8Encoding(false).GetBytes(text));
    }

    /// <summary>Flushes and puts the file in place.</summary>
    public void Commit()
    {
        writer?.Flush();
        if (standardOutput)
        {
            ObjectDisposedException.ThrowIf(stdout is null, this);
            stdout.Flush();
            stdout = null;
            committed = true;
            return;
        }

        ObjectDisposedException.ThrowIf(stream is null, this);
        if (tempPath is null)
        {
            stream.Flush();
            stream.Dispose();
            stream = null;
            committed = true;
            return;
        }

        stream.Flush(flushToDisk: true);

        // Renamed while the lock is still held, so no second writer can open the temporary in between.
        File.Move(tempPath, finalPath, overwrite: true);
        TemporaryFiles.Forget(tempPath);
        committed = true;
        stream.Dispose();
        stream = null;
    }

    /// <inheritdoc/>
    public void Dispose()
    {
        if (standardOutput)
        {
            // Standard output belongs to the process: flush what was written, never close it.
            if (stdout is not null)
            {
                writer?.Flush();
                stdout.Flush();
            }

            writer = null;
            stdout = null;
            return;
        }

        if (stream is not null)
        {
            writer?.Dispose();
        }

        writer = null;
        if (!committed && tempPath is not null && stream is not null)
        {
            // Deleted while the lock is held: the name is ours until the stream closes.
            TryDelete(tempPath);
            TemporaryFiles.Forget(tempPath);
        }

        stream?.Dispose();
        stream = null;
    }

    private static FileStream OpenLocked(string userPath, string temp)
    {
        for (int attempt = 0; ; attempt++)
        {
            FileStream s;
            try
            {
                s = new FileStream(temp, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None, BufferSize);
            }
            catch (IOException ex) when ((ex.HResult & 0xFFFF) is SharingViolation or LockViolation || ex.HResult == WouldBlock)
            {
                throw BadInputException.At(userPath, 0, null, "another process is writing this output (its temporary " + temp + " is locked); wait for it or choose another output");
            }
            catch (IOException ex) when (ex is not FileNotFoundException and not DirectoryNotFoundException)
            {
                throw BadInputException.At(userPath, 0, null, "cannot be written: " + ex.Message);
            }
            catch (UnauthorizedAccessException ex)
            {
                throw BadInputException.At(userPath, 0, null, "cannot be written: " + ex.Message);
            }

            // The lock is on the opened file; if a finishing writer renamed that file away meanwhile, start again.
            bool stale = attempt < 10 && FileIdentity.Of(s.SafeFileHandle) is { } held && FileIdentity.Of(temp) != held;
            if (!stale)
            {
#pragma warning disable IDISP011 // a fresh stream is opened on every pass; only a stale one is disposed
                return s;
#pragma warning restore IDISP011
            }

            s.Dispose();
        }
    }

    private static void TryDelete(string path)
    {
        try
        {
            File.Delete(path);
        }
        catch (IOException)
        {
        }
        catch (UnauthorizedAccessException)
        {
        }
    }
}
