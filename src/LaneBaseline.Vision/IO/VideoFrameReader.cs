using LaneBaseline.Core;
using LaneBaseline.Core.Options;
using OpenCvSharp;

namespace LaneBaseline.Vision.IO;

/// <summary>Reads a video file frame by frame (keys <c>VIDEO#NNNNNN</c>, timestamps from the container or index / fps).</summary>
public sealed class VideoFrameReader : IDisposable
{
    private readonly VideoCapture capture;
    private readonly string path;
    private readonly LimitsOptions limits;
    private readonly double fps;
    private int index;

    /// <summary>Opens a video.</summary>
    /// <exception cref="BadInputException">The file is missing or cannot be opened as a video.</exception>
    public VideoFrameReader(string path, LimitsOptions limits)
    {
        this.path = path;
        this.limits = limits;
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "no such video file");
        }

        capture = new VideoCapture(path);
        if (!capture.IsOpened())
        {
            capture.Dispose();
            throw BadInputException.At(path, 0, null, "cannot open the video (corrupt or unsupported codec)");
        }

        fps = capture.Fps;
    }

    /// <summary>Reads the next frame; the caller owns the returned Mat. False at the end of the stream.</summary>
    /// <exception cref="BadInputException">The first frame cannot be decoded, or a frame has an unsupported size.</exception>
    public bool TryRead(out Mat frame, out FrameItem item)
    {
#pragma warning disable IDISP001 // ownership passes to the caller through 'frame' (or it is disposed below)
        var mat = new Mat();
#pragma warning restore IDISP001
        if (!capture.Read(mat) || mat.Empty())
        {
            mat.Dispose();
            frame = null!;
            item = null!;
            if (index == 0)
            {
                throw BadInputException.At(path, 0, null, "the video has no decodable frame (corrupt or unsupported codec)");
            }

            return false;
        }

        string key = FrameListing.VideoKey(index);
        try
        {
            FrameLoader.Check(mat, path + " frame " + key, limits);
        }
        catch
        {
            mat.Dispose();
            throw;
        }

        double t = fps > 0 ? index / fps : index;
        item = new FrameItem(index, key, null, t);
        frame = mat;
        index++;
        return true;
    }

    /// <inheritdoc />
    public void Dispose() => capture.Dispose();
}
