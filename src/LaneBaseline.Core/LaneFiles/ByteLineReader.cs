using System.Buffers;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// Reads a stream line by line as raw UTF-8 bytes ('\n' separated, a trailing '\r' removed), holding one line
/// in memory at a time. The returned span is valid until the next call. Each byte is searched for the line end once
/// (linear however small the reads of a pipe are), and a line longer than <see cref="MaxLineBytes"/> is bad input.
/// </summary>
internal sealed class ByteLineReader : IDisposable
{
    private readonly Stream stream;
    private readonly string displayName;
    private byte[] buffer;
    private int start;
    private int end;
    private int scanned; // bytes from start already known to hold no '\n'
    private bool eof;

    public ByteLineReader(Stream stream, string displayName, int initialCapacity = 1 << 16, int maxLineBytes = InputLimits.MaxLineBytes)
    {
        this.stream = stream;
        this.displayName = displayName;
        MaxLineBytes = maxLineBytes;
        buffer = ArrayPool<byte>.Shared.Rent(Math.Min(initialCapacity, maxLineBytes + 1));
    }

    /// <summary>Bytes searched for a line end so far (each byte once: the reader is linear).</summary>
    public long BytesSearched { get; private set; }

    /// <summary>Longest accepted line in bytes, without its line ending.</summary>
    public int MaxLineBytes { get; }

    /// <summary>Number of lines returned so far (the one-based number of the last line).</summary>
    public long LineNumber { get; private set; }

    /// <summary>Whether the last line returned ended without a newline (the file's last line was cut short).</summary>
    public bool LastLineUnterminated { get; private set; }

    public bool TryReadLine(out ReadOnlySpan<byte> line)
    {
        while (true)
        {
            int found = buffer.AsSpan(start + scanned, end - start - scanned).IndexOf((byte)'\n');
            BytesSearched += found >= 0 ? found + 1 : end - start - scanned;
            if (found >= 0)
            {
                int nl = start + scanned + found;
                line = Trim(buffer.AsSpan(start, nl - start));
                CheckLength(line.Length);
                start = nl + 1;
                scanned = 0;
                LineNumber++;
                LastLineUnterminated = false;
                return true;
            }

            if (eof)
            {
                if (end > start)
                {
                    line = Trim(buffer.AsSpan(start, end - start));
                    CheckLength(line.Length);
                    start = end;
                    scanned = 0;
                    LineNumber++;
                    LastLineUnterminated = true;
                    return true;
                }

                line = default;
                return false;
            }

            scanned = end - start;
            CheckLength(scanned - 1L); // a pending line of Max + 2 bytes is too long whatever follows (at most one '\r' is dropped)
            Fill();
        }
    }

    /// <summary>Throws when a line's content (without its line ending) is longer than <see cref="MaxLineBytes"/>.</summary>
    private void CheckLength(long contentBytes)
    {
        if (contentBytes > MaxLineBytes)
        {
            throw BadInputException.At(displayName, LineNumber + 1, null, string.Create(
                System.Globalization.CultureInfo.InvariantCulture,
                $"the line is longer than {MaxLineBytes} bytes, the documented maximum line length"));
        }
    }

    private static ReadOnlySpan<byte> Trim(ReadOnlySpan<byte> line) =>
        line.Length > 0 && line[^1] == (byte)'\r' ? line[..^1] : line;

    private void Fill()
    {
        if (start > 0)
        {
            Buffer.BlockCopy(buffer, start, buffer, 0, end - start);
            end -= start;
            start = 0;
        }

        if (end == buffer.Length)
        {
            // at most MaxLineBytes + 2 bytes are ever held (a line, its '\r' and one byte that proves it too long)
            int size = (int)Math.Min((long)buffer.Length * 2, (long)MaxLineBytes + 2);
            byte[] bigger = ArrayPool<byte>.Shared.Rent(size);
            Buffer.BlockCopy(buffer, 0, bigger, 0, end);
            ArrayPool<byte>.Shared.Return(buffer);
            buffer = bigger;
        }

        int read = stream.Read(buffer, end, buffer.Length - end);
        if (read == 0)
        {
            eof = true;
        }
        else
        {
            end += read;
        }
    }

    public void Dispose()
    {
        ArrayPool<byte>.Shared.Return(buffer);
        buffer = [];
#pragma warning disable IDISP007 // the reader owns the stream it was given (documented contract)
        stream.Dispose();
#pragma warning restore IDISP007
    }
}
