using System.Buffers;
using System.Buffers.Binary;

namespace LaneBaseline.Core.IO;

/// <summary>
/// Reads an image's declared size from its header without decoding any pixels, so an oversized image is refused
/// before a decoder allocates it (a 2.6 MB PNG may declare 30000x30000, 2.6 GB decoded). Knows PNG, JPEG, BMP, WebP
/// and TIFF; other formats give null. Reads at most <see cref="MaxHeaderBytes"/> bytes.
/// </summary>
public static class ImageHeader
{
    /// <summary>Most bytes read from the start of a file while looking for the size.</summary>
    public const int MaxHeaderBytes = 1 << 20;

    private const int FirstReadBytes = 1 << 12;

    /// <summary>The size the file declares, or null when its format is not one of these or its header is cut short.</summary>
    public static (int Width, int Height)? TryRead(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1);
        long length = stream.Length;
        byte[] head = ArrayPool<byte>.Shared.Rent(MaxHeaderBytes);
        try
        {
            // 4 KiB hold the size of every format but a JPEG with large metadata segments before its frame header
            int have = stream.ReadAtLeast(head.AsSpan(0, (int)Math.Min(length, FirstReadBytes)), (int)Math.Min(length, FirstReadBytes), throwOnEndOfStream: false);
            (int, int)? size = TryRead(head.AsSpan(0, have));
            if (size is null && have < length && have >= 2 && head[0] == 0xFF && head[1] == 0xD8)
            {
                int more = (int)Math.Min(length, MaxHeaderBytes) - have;
                have += stream.ReadAtLeast(head.AsSpan(have, more), more, throwOnEndOfStream: false);
                size = TryRead(head.AsSpan(0, have));
            }

            return size;
        }
        finally
        {
            ArrayPool<byte>.Shared.Return(head);
        }
    }

    /// <summary>The size declared by the first bytes of an image file, or null.</summary>
    public static (int Width, int Height)? TryRead(ReadOnlySpan<byte> head)
    {
        if (head.StartsWith((ReadOnlySpan<byte>)[0x89, (byte)'P', (byte)'N', (byte)'G', 0x0D, 0x0A, 0x1A, 0x0A]))
        {
            return Png(head);
        }

        if (head.Length >= 3 && head[0] == 0xFF && head[1] == 0xD8)
        {
            return Jpeg(head);
        }

        if (head.StartsWith("BM"u8))
        {
            return Bmp(head);
        }

        if (head.Length >= 16 && head.StartsWith("RIFF"u8) && head[8..12].SequenceEqual("WEBP"u8))
        {
            return WebP(head);
        }

        if (head.StartsWith("II*\0"u8) || head.StartsWith("MM\0*"u8))
        {
            return Tiff(head);
        }

        return null;
    }

    // Source: PNG specification (ISO/IEC 15948:2003), sec. 5.2 signature, 5.3 chunk layout, 11.2.2 IHDR (width and
    // height are 4-byte big-endian unsigned integers, the first chunk after the signature).
    private static (int, int)? Png(ReadOnlySpan<byte> h)
    {
        if (h.Length < 24 || !h[12..16].SequenceEqual("IHDR"u8))
        {
            return null;
        }

        return Size(BinaryPrimitives.ReadUInt32BigEndian(h[16..]), BinaryPrimitives.ReadUInt32BigEndian(h[20..]));
    }

    // Source: ITU-T T.81 (JPEG), B.1.1 markers (0xFF, fill bytes 0xFF, stand-alone markers RSTm, SOI, EOI, TEM),
    // B.2.2 frame header (SOFn: C0-C3, C5-C7, C9-CB, CD-CF; length, P, Y = lines, X = samples per line).
    private static (int, int)? Jpeg(ReadOnlySpan<byte> h)
    {
        int i = 2;
        while (i + 1 < h.Length)
        {
            if (h[i] != 0xFF)
            {
                return null;
            }

            byte marker = h[i + 1];
            if (marker == 0xFF)
            {
                i++; // fill byte
                continue;
            }

            i += 2;
            if (marker is 0x01 or (>= 0xD0 and <= 0xD8))
            {
                continue; // no length field
            }

            if (marker is 0xD9 or 0xDA || i + 2 > h.Length)
            {
                return null; // end of image or start of scan before any frame header
            }

            int length = BinaryPrimitives.ReadUInt16BigEndian(h[i..]);
            bool sof = marker is >= 0xC0 and <= 0xCF && marker is not (0xC4 or 0xC8 or 0xCC);
            if (sof)
            {
                if (i + 7 > h.Length)
                {
                    return null;
                }

                int lines = BinaryPrimitives.ReadUInt16BigEndian(h[(i + 3)..]);
                int samples = BinaryPrimitives.ReadUInt16BigEndian(h[(i + 5)..]);
                return lines == 0 ? null : Size((uint)samples, (uint)lines); // Y = 0: lines given later (DNL), unknown here
            }

            if (length < 2)
            {
                return null;
            }

            i += length;
        }

        return null;
    }

    // Source: Microsoft BITMAPFILEHEADER (14 bytes) followed by BITMAPINFOHEADER (biWidth, biHeight as signed 32-bit,
    // a negative height meaning top-down rows) or the 12-byte BITMAPCOREHEADER (16-bit width and height).
    private static (int, int)? Bmp(ReadOnlySpan<byte> h)
    {
        if (h.Length < 26)
        {
            return null;
        }

        uint dib = BinaryPrimitives.ReadUInt32LittleEndian(h[14..]);
        if (dib == 12)
        {
            return Size(BinaryPrimitives.ReadUInt16LittleEndian(h[18..]), BinaryPrimitives.ReadUInt16LittleEndian(h[20..]));
        }

        long w = BinaryPrimitives.ReadInt32LittleEndian(h[18..]), ht = BinaryPrimitives.ReadInt32LittleEndian(h[22..]);
        return Size((uint)Math.Min(Math.Abs(w), uint.MaxValue), (uint)Math.Min(Math.Abs(ht), uint.MaxValue));
    }

    // Source: WebP container specification (RIFF 'WEBP'; chunk 'VP8 ': RFC 6386 sec. 9.1 frame start code 9D 01 2A
    // then 14-bit width and height; 'VP8L': signature 0x2F then 14-bit width-1 and height-1; 'VP8X': 24-bit canvas
    // width-1 and height-1 at bytes 24 and 27).
    private static (int, int)? WebP(ReadOnlySpan<byte> h)
    {
        ReadOnlySpan<byte> chunk = h[12..16];
        if (chunk.SequenceEqual("VP8X"u8) && h.Length >= 30)
        {
            uint w = h[24] | ((uint)h[25] << 8) | ((uint)h[26] << 16);
            uint ht = h[27] | ((uint)h[28] << 8) | ((uint)h[29] << 16);
            return Size(w + 1, ht + 1);
        }

        if (chunk.SequenceEqual("VP8L"u8) && h.Length >= 25 && h[20] == 0x2F)
        {
            uint bits = BinaryPrimitives.ReadUInt32LittleEndian(h[21..]);
            return Size((bits & 0x3FFF) + 1, ((bits >> 14) & 0x3FFF) + 1);
        }

        if (chunk.SequenceEqual("VP8 "u8) && h.Length >= 30 && h[23] == 0x9D && h[24] == 0x01 && h[25] == 0x2A)
        {
            return Size(BinaryPrimitives.ReadUInt16LittleEndian(h[26..]) & 0x3FFFu, BinaryPrimitives.ReadUInt16LittleEndian(h[28..]) & 0x3FFFu);
        }

        return null;
    }

    // Source: TIFF 6.0 specification, sec. 2 (header: byte order, 42, offset of the first IFD; IFD entries of 12
    // bytes: tag, type, count, value) and sec. 8 (ImageWidth = tag 256, ImageLength = tag 257, SHORT or LONG).
    private static (int, int)? Tiff(ReadOnlySpan<byte> h)
    {
        bool little = h[0] == (byte)'I';
        if (h.Length < 8)
        {
            return null;
        }

        uint ifd = U32(h, 4, little);
        if (ifd > (uint)(h.Length - 2))
        {
            return null;
        }

        int count = U16(h, (int)ifd, little);
        uint? w = null, ht = null;
        for (int k = 0; k < count; k++)
        {
            int e = (int)ifd + 2 + (12 * k);
            if (e + 12 > h.Length)
            {
                return null;
            }

            ushort tag = U16(h, e, little), type = U16(h, e + 2, little);
            uint value = type == 3 ? U16(h, e + 8, little) : type == 4 ? U32(h, e + 8, little) : 0;
            if (tag == 256)
            {
                w = value;
            }
            else if (tag == 257)
            {
                ht = value;
            }
        }

        return w is uint ww && ht is uint hh ? Size(ww, hh) : null;
    }

    private static uint U32(ReadOnlySpan<byte> h, int at, bool little) =>
        little ? BinaryPrimitives.ReadUInt32LittleEndian(h[at..]) : BinaryPrimitives.ReadUInt32BigEndian(h[at..]);

    private static ushort U16(ReadOnlySpan<byte> h, int at, bool little) =>
        little ? BinaryPrimitives.ReadUInt16LittleEndian(h[at..]) : BinaryPrimitives.ReadUInt16BigEndian(h[at..]);

    private static (int, int) Size(uint width, uint height) =>
        ((int)Math.Min(width, int.MaxValue), (int)Math.Min(height, int.MaxValue));
}
