using System.Buffers;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// Reads a stream line by line as raw UTF-8 bytes ('\n' separated, a trailing '\r' removed), holding one line
/// in memory at a time. The returned span is valid until the next call.
/// </summary>
internal sealed class ByteLineReader : IDisposable
{
    private readonly Stream stream;
    private byte[] buffer;
    private int start;
    private int end;
    private bool eof;

    public ByteLineReader(Stream stream, int initialCapacity = 1 << 16)
    {
        this.stream = stream;
        buffer = ArrayPool<byte>.Shared.Rent(initialCapacity);
    }

    /// <summary>Number of lines returned so far (the one-based number of the last line).</summary>
    public long LineNumber { get; private set; }

    /// <summary>Whether the last line returned ended without a newline (the file's last line was cut short).</summary>
    public bool LastLineUnterminated { get; private set; }

    public bool TryReadLine(out ReadOnlySpan<byte> line)
    {
        while (true)
        {
            int nl = Array.IndexOf(buffer, (byte)'\n', start, end - start);
            if (nl >= 0)
            {
                line = Trim(buffer.AsSpan(start, nl - start));
                start = nl + 1;
                LineNumber++;
                LastLineUnterminated = false;
                return true;
            }

            if (eof)
            {
                if (end > start)
                {
                    line = Trim(buffer.AsSpan(start, end - start));
                    start = end;
                    LineNumber++;
                    LastLineUnterminated = true;
                    return true;
                }

                line = default;
                return false;
            }

            Fill();
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
            byte[] bigger = ArrayPool<byte>.Shared.Rent(buffer.Length * 2);
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
