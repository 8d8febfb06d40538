using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.IO;
using LaneBaseline.Core.Options;
using OpenCvSharp;

namespace LaneBaseline.Vision.IO;

/// <summary>Decodes and checks one image frame; every failure is a <see cref="BadInputException"/> naming the file.</summary>
public static class FrameLoader
{
    /// <summary>
    /// Decodes an image as 8-bit BGR (a 4-channel image loses its alpha). Grey, 16-bit or float images, images that do
    /// not decode (zero-byte, corrupt, not an image) and sizes outside <paramref name="limits"/> are bad input.
    /// </summary>
    /// <returns>The frame; the caller owns it.</returns>
    public static Mat Load(string path, LimitsOptions limits)
    {
        ArgumentNullException.ThrowIfNull(limits);
        var info = new FileInfo(path);
        if (!info.Exists)
        {
            throw BadInputException.At(path, 0, null, "image file does not exist");
        }

        if (info.Length == 0)
        {
            throw BadInputException.At(path, 0, null, "image file is empty (0 bytes)");
        }

        CheckDeclaredSize(path, limits.MaxWidthPx, limits.MaxHeightPx, "limits.* in the preset");
        ImageIntegrity.CheckComplete(path);
        Mat mat = Cv2.ImRead(path, ImreadModes.Unchanged);
        try
        {
            return Check(mat, path, limits);
        }
        catch
        {
            mat.Dispose();
            throw;
        }
    }

    /// <summary>
    /// Refuses an image whose header declares more than <paramref name="maxWidthPx"/> x <paramref name="maxHeightPx"/>
    /// or more than <see cref="InputLimits.MaxFramePixels"/> pixels, before any pixel is decoded (<see cref="ImageHeader"/>).
    /// Formats whose header is not read are left to the decoder and checked after decoding.
    /// </summary>
    /// <exception cref="BadInputException">The declared size is too large.</exception>
    public static void CheckDeclaredSize(string path, int maxWidthPx, int maxHeightPx, string limitsSource)
    {
        (int Width, int Height)? size;
        try
        {
            size = ImageHeader.TryRead(path);
        }
        catch (IOException ex)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }
        catch (UnauthorizedAccessException ex)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }

        if (size is (int w, int h) && (w > maxWidthPx || h > maxHeightPx || (long)w * h > InputLimits.MaxFramePixels))
        {
            throw BadInputException.At(path, 0, null, string.Create(
                CultureInfo.InvariantCulture,
                $"the image header declares {w}x{h} pixels, more than the accepted {maxWidthPx}x{maxHeightPx} ({limitsSource}) and at most {InputLimits.MaxFramePixels} pixels; refused before decoding"));
        }
    }

    /// <summary>Checks a decoded frame (size, depth, channels); converts BGRA to BGR in place.</summary>
    /// <returns>The frame to use (the same instance).</returns>
    public static Mat Check(Mat mat, string name, LimitsOptions limits)
    {
        ArgumentNullException.ThrowIfNull(mat);
        ArgumentNullException.ThrowIfNull(limits);
        if (mat.Empty())
        {
            throw BadInputException.At(name, 0, null, "cannot decode the image (corrupt or not an image)");
        }

        if (mat.Depth() != MatType.CV_8U)
        {
            throw BadInputException.At(name, 0, null, "the image is not 8-bit per channel (16-bit or float images are not supported; convert to 8-bit)");
        }

        int channels = mat.Channels();
        if (channels is 1 or 2)
        {
            throw BadInputException.At(name, 0, null, "the image is greyscale; colour (3-channel) frames are needed for the paint thresholds");
        }

        if (channels == 4)
        {
            Cv2.CvtColor(mat, mat, ColorConversionCodes.BGRA2BGR);
        }

        int w = mat.Cols, h = mat.Rows;
        if (w < limits.MinWidthPx || h < limits.MinHeightPx || w > limits.MaxWidthPx || h > limits.MaxHeightPx)
        {
            throw BadInputException.At(name, 0, null, string.Create(
                CultureInfo.InvariantCulture,
                $"frame size {w}x{h} is outside the accepted {limits.MinWidthPx}x{limits.MinHeightPx} to {limits.MaxWidthPx}x{limits.MaxHeightPx} (limits.* in the preset)"));
        }

        return mat;
    }
}
