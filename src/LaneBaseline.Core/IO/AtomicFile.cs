using System.Globalization;
using System.Text;

namespace LaneBaseline.Core.IO;

/// <summary>
/// The one way every command writes an output file: through a temporary sibling that is renamed into place on
/// <see cref="Commit"/>, so an error or interruption never leaves a half-written output (disposing without committing
/// deletes the temporary). A missing output folder is created. A symbolic link is followed and its final target
/// replaced (the link stays). An existing output that is not a regular file (FIFO, character device, or a link to
/// one) is written in place and never renamed over. The path <c>-</c> is standard output (<see cref="StandardStreams"/>):
/// written as it goes and flushed on <see cref="Commit"/>, never closed.
/// </summary>
public sealed class AtomicFile : IDisposable
{
    private const int BufferSize = 1 << 16;
    private readonly string finalPath;
    private readonly string? tempPath;
    private readonly bool standardOutput;
    private FileStream? stream;
    private Stream? stdout; // standard output for the path '-': borrowed, never disposed
    private StreamWriter? writer;
    private bool committed;

    /// <summary>Opens the output <paramref name="path"/> for writing.</summary>
    public AtomicFile(string path)
    {
        if (StandardStreams.IsDash(path))
        {
            finalPath = path;
            standardOutput = true;
            stdout = StandardStreams.Output;
            return;
        }

        OutputTarget target = OutputTarget.Resolve(path);
        finalPath = target.Path;
        if (target.InPlace)
        {
            stream = new FileStream(finalPath, FileMode.Open, FileAccess.Write, FileShare.ReadWrite, BufferSize);
            return;
        }

        string? dir = Path.GetDirectoryName(finalPath);
        if (dir is not null)
        {
            Directory.CreateDirectory(dir);
        }

        tempPath = finalPath + "." + Environment.ProcessId.ToString(CultureInfo.InvariantCulture) + ".tmp";
        stream = new FileStream(tempPath, FileMode.Create, FileAccess.Write, FileShare.None, BufferSize);
    }

    /// <summary>The stream to write (owned by this object).</summary>
    public Stream Stream => (Stream?)stream ?? stdout ?? throw new ObjectDisposedException(nameof(AtomicFile));

    /// <summary>A UTF-8 (no BOM) text writer on <see cref="Stream"/>, owned by this object.</summary>
    public TextWriter Writer => writer ??= new StreamWriter(Stream, new UTF8Encoding(false), BufferSize, leaveOpen: true);

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
        stream.Dispose();
        stream = null;
        File.Move(tempPath, finalPath, overwrite: true);
        committed = true;
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
        stream?.Dispose();
        stream = null;
        if (!committed && tempPath is not null && File.Exists(tempPath))
        {
            File.Delete(tempPath);
        }
    }
}
