using LaneBaseline.Core;

namespace LaneBaseline.Vision.IO;

/// <summary>
/// Finds image files cut short before decoding. OpenCV decodes a truncated JPEG into a partly grey image and only
/// prints a warning (premature end of data), which would turn a damaged frame into a record with no lanes; so a
/// JPEG must end with its end-of-image marker and a PNG must hold its closing chunk.
/// </summary>
public static class ImageIntegrity
{
    private const int TailBytes = 4096;

    /// <summary>Throws <see cref="BadInputException"/> naming <paramref name="path"/> when the file is a truncated JPEG or PNG.</summary>
    public static void CheckComplete(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        string? problem;
        try
        {
            problem = Problem(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }

        if (problem is not null)
        {
            throw BadInputException.At(path, 0, null, problem);
        }
    }

    /// <summary>Why the file at <paramref name="path"/> is incomplete, or null when it is complete or of another format.</summary>
    public static string? Problem(string path)
    {
        using var s = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1);
        if (!s.CanSeek)
        {
            return null;
        }

        byte[] head = new byte[8];
        int n = s.ReadAtLeast(head, head.Length, throwOnEndOfStream: false);
        int tailLength = (int)Math.Min(TailBytes, s.Length);
        byte[] tail = new byte[tailLength];
        s.Seek(-tailLength, SeekOrigin.End);
        s.ReadExactly(tail);

        // Source: ITU-T T.81 (JPEG), Annex B.1.1.3: a compressed image starts with SOI (FF D8) and ends with EOI
        // (FF D9); FF bytes in entropy-coded data are stuffed (FF 00), so FF D9 cannot occur inside it.
        if (n >= 2 && head[0] == 0xFF && head[1] == 0xD8)
        {
            return tail.AsSpan().IndexOf([(byte)0xFF, (byte)0xD9]) >= 0 && s.Length > 4 ? null
                : "truncated JPEG: no end-of-image marker (premature end of data); the file is damaged or was cut short";
        }

        // Source: PNG specification (ISO/IEC 15948:2004), 5.2 and 11.2.5: the signature 89 50 4E 47 0D 0A 1A 0A, and
        // the last chunk is IEND.
        if (n == 8 && head.AsSpan().SequenceEqual((ReadOnlySpan<byte>)[0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A]))
        {
            return tail.AsSpan().IndexOf("IEND"u8) >= 0 ? null
                : "truncated PNG: no IEND chunk (premature end of data); the file is damaged or was cut short";
        }

        return null;
    }
}
