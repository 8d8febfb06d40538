using System.Text;

namespace LaneBaseline.Cli;

/// <summary>
/// A write-only stream that decodes UTF-8 bytes into a <see cref="TextWriter"/>: the stream behind <c>-</c> (standard
/// output) is the writer the command line was given, so files written to <c>-</c> and the tool's own text share one
/// ordered channel, in a terminal and in-process alike.
/// </summary>
internal sealed class TextWriterStream(TextWriter target) : Stream
{
    private readonly Decoder decoder = new UTF8Encoding(false).GetDecoder();
    private char[] chars = new char[4096];

    public override bool CanRead => false;

    public override bool CanSeek => false;

    public override bool CanWrite => true;

    public override long Length => throw new NotSupportedException();

    public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }

    public override void Flush() => target.Flush();

    public override int Read(byte[] buffer, int offset, int count) => throw new NotSupportedException();

    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    public override void SetLength(long value) => throw new NotSupportedException();

    public override void Write(byte[] buffer, int offset, int count) => Write(buffer.AsSpan(offset, count));

    public override void Write(ReadOnlySpan<byte> buffer)
    {
        int need = decoder.GetCharCount(buffer, flush: false);
        if (need > chars.Length)
        {
            chars = new char[Math.Max(need, chars.Length * 2)];
        }

        int n = decoder.GetChars(buffer, chars, flush: false);
        target.Write(chars, 0, n);
    }
}
