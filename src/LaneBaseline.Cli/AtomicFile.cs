namespace LaneBaseline.Cli;

/// <summary>
/// Writes an output file through a temporary sibling that is renamed into place on <see cref="Commit"/>; disposing
/// without committing deletes the temporary, so an error or interruption never leaves a half-written output.
/// </summary>
internal sealed class AtomicFile : IDisposable
{
    private readonly string finalPath;
    private readonly string tempPath;
    private FileStream? stream;
    private bool committed;

    public AtomicFile(string path)
    {
        finalPath = Path.GetFullPath(path);
        string? dir = Path.GetDirectoryName(finalPath);
        if (dir is not null && !Directory.Exists(dir))
        {
            throw new UsageException($"{path}: the output folder does not exist");
        }

        tempPath = finalPath + "." + Environment.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture) + ".tmp";
        stream = new FileStream(tempPath, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 16);
    }

    private StreamWriter? writer;

    public Stream Stream => stream ?? throw new ObjectDisposedException(nameof(AtomicFile));

    /// <summary>A UTF-8 (no BOM) text writer on the temporary file, owned by this object.</summary>
    public TextWriter Writer => writer ??= new StreamWriter(Stream, new System.Text.UTF8Encoding(false), 1 << 16, leaveOpen: true);

    public void Commit()
    {
        ObjectDisposedException.ThrowIf(stream is null, this);
        writer?.Flush();
        stream.Flush(flushToDisk: true);
        stream.Dispose();
        stream = null;
        File.Move(tempPath, finalPath, overwrite: true);
        committed = true;
    }

    public void Dispose()
    {
        if (stream is not null)
        {
            writer?.Dispose();
        }

        writer = null;
        stream?.Dispose();
        stream = null;
        if (!committed && File.Exists(tempPath))
        {
            File.Delete(tempPath);
        }
    }
}
