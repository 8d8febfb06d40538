using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.IO;
using OpenCvSharp;

namespace LaneBaseline.Vision.Masks;

/// <summary>
/// The mask-folder layout: the mask of frame key <c>K</c> is <c>DIR/&lt;K with its extension replaced by .png&gt;</c>
/// (a key without an extension gets <c>.png</c> appended), e.g. <c>dusk/000012.jpg</c> →
/// <c>DIR/dusk/000012.png</c>, <c>clip.mp4#000012</c> → <c>DIR/clip.mp4#000012.png</c>.
/// </summary>
public static class MaskFiles
{
    /// <summary>The relative mask path ('/'-separated) of a frame key.</summary>
    public static string MaskKeyFor(string frameKey)
    {
        ArgumentNullException.ThrowIfNull(frameKey);
        int slash = frameKey.LastIndexOf('/');
        int dot = frameKey.LastIndexOf('.');
        int hash = frameKey.LastIndexOf('#');
        return dot > slash && dot > hash && dot > 0 && dot > slash + 1 ? frameKey[..dot] + ".png" : frameKey + ".png";
    }

    /// <summary>Every <c>*.png</c> under a folder, as '/'-separated relative paths in ordinal order.</summary>
    public static List<string> List(string dir)
    {
        var list = IO.FrameListing.FilesUnder(dir, followLinks: false, dir)
            .Where(f => f.EndsWith(".png", StringComparison.Ordinal))
            .Select(f => Path.GetRelativePath(dir, f).Replace(Path.DirectorySeparatorChar, '/'))
            .ToList();
        list.Sort(StringComparer.Ordinal);
        return list;
    }

    /// <summary>Longest accepted side of a mask in pixels (and at most <see cref="InputLimits.MaxFramePixels"/> pixels in all).</summary>
    public const int MaxSidePx = 32768;

    /// <summary>Reads a mask and checks it is one channel of 8 or 16 bits (its declared size is checked before decoding).</summary>
    /// <returns>The mask; the caller owns it.</returns>
    public static Mat Read(string path)
    {
        IO.FrameLoader.CheckDeclaredSize(path, MaxSidePx, MaxSidePx, "the mask limit");
        if (File.Exists(path))
        {
            IO.ImageIntegrity.CheckComplete(path);
        }

        Mat m = Cv2.ImRead(path, ImreadModes.Unchanged);
        try
        {
            if (m.Empty())
            {
                throw BadInputException.At(path, 0, null, "cannot be decoded as an image");
            }

            if (m.Channels() != 1)
            {
                throw BadInputException.At(path, 0, null, string.Create(CultureInfo.InvariantCulture, $"has {m.Channels()} channels; an instance mask has one (8- or 16-bit, pixel value = lane id, 0 = background)"));
            }

            if (m.Depth() != MatType.CV_8U && m.Depth() != MatType.CV_16U)
            {
                throw BadInputException.At(path, 0, null, "an instance mask must be 8- or 16-bit unsigned");
            }

            if (m.Cols > MaxSidePx || m.Rows > MaxSidePx || (long)m.Cols * m.Rows > InputLimits.MaxFramePixels)
            {
                throw BadInputException.At(path, 0, null, string.Create(CultureInfo.InvariantCulture, $"a {m.Cols}x{m.Rows} mask is larger than the accepted {MaxSidePx}x{MaxSidePx} and {InputLimits.MaxFramePixels} pixels"));
            }

            return m;
        }
        catch
        {
            m.Dispose();
            throw;
        }
    }

    /// <summary>Writes a mask as PNG atomically (temporary sibling, then rename), creating folders as needed.</summary>
    public static void Write(string path, Mat mask)
    {
        ArgumentNullException.ThrowIfNull(mask);
        Cv2.ImEncode(".png", mask, out byte[] bytes);
        AtomicFile.WriteAllBytes(path, bytes);
    }
}
