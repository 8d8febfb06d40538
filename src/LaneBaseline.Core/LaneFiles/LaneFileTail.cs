namespace LaneBaseline.Core.LaneFiles;

/// <summary>The end of a lane file that an interrupted run may have cut short (for <c>--resume</c>).</summary>
public static class LaneFileTail
{
    private const int ChunkBytes = 1 << 16;

    /// <summary>
    /// Removes an unterminated last line (a record the interrupted run had not finished) by truncating the file after
    /// its last '\n'. Reads backwards from the end in 64 KiB chunks, so memory stays bounded whatever the file size.
    /// </summary>
    /// <returns>The number of bytes removed (0 when the file ends with '\n' or is empty).</returns>
    public static long TrimUnterminatedLine(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.ReadWrite, FileShare.Read, 1);
        long length = stream.Length;
        long keep = LastLineEnd(stream, length);
        if (keep < length)
        {
            stream.SetLength(keep);
            stream.Flush(flushToDisk: true);
        }

        return length - keep;
    }

    /// <summary>The offset just after the last '\n' of the first <paramref name="length"/> bytes, or 0 when there is none.</summary>
    internal static long LastLineEnd(Stream stream, long length)
    {
        ArgumentNullException.ThrowIfNull(stream);
        byte[] chunk = new byte[ChunkBytes];
        long pos = length;
        while (pos > 0)
        {
            int n = (int)Math.Min(ChunkBytes, pos);
            pos -= n;
            stream.Position = pos;
            stream.ReadExactly(chunk, 0, n);
            int nl = chunk.AsSpan(0, n).LastIndexOf((byte)'\n');
            if (nl >= 0)
            {
                return pos + nl + 1;
            }
        }

        return 0;
    }
}
