namespace LaneBaseline.Cli;

/// <summary>A view of a stream whose Dispose only flushes, for writers that dispose what they are given.</summary>
internal sealed class NonClosingStream(Stream inner) : Stream
{
    public override bool CanRead => false;

    public override bool CanSeek => false;

    public override bool CanWrite => true;

    public override long Length => inner.Length;

    public override long Position { get => inner.Position; set => throw new NotSupportedException(); }

    public override void Flush()
    {
        if (inner.CanWrite)
        {
            inner.Flush();
        }
    }

    public override int Read(byte[] buffer, int offset, int count) => throw new NotSupportedException();

    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    public override void SetLength(long value) => throw new NotSupportedException();

    public override void Write(byte[] buffer, int offset, int count) => inner.Write(buffer, offset, count);

    public override void Write(ReadOnlySpan<byte> buffer) => inner.Write(buffer);

    protected override void Dispose(bool disposing)
    {
        if (disposing && inner.CanWrite)
        {
            inner.Flush(); // skipped once the owner has committed and closed it
        }

        base.Dispose(disposing);
    }
}
