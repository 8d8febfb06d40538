using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Text;
using LaneBaseline.Cli.Bench;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Cli.Commands;

/// <summary>Detect, part 3: the files beside the lane file (overlays, stage sheets, the effective configuration) and the resume state.</summary>
internal sealed partial class DetectRunner
{
    private void WriteImages(FrameWorkspace ws, FrameItem item)
    {
        // Keys come from folder names, list files or video indices; SafeRelativePath keeps every image inside its folder.
        string stem = item.Key.Replace('#', '_');
        if (request.OverlaysDir is string dir)
        {
            using var canvas = ws.Frame.Clone();
            OverlayRenderer.Draw(ws, canvas);
            if (ws.Enlarged)
            {
                // drawn at the working size, saved at the frame's own size like every other output
                Cv2.Resize(canvas, canvas, new Size(ws.FrameWidth, ws.FrameHeight), 0, 0, InterpolationFlags.Area);
            }

            Save(SafeRelativePath.Under(dir, stem, ".png"), canvas);
        }

        if (request.StagesDir is string sdir && item.Index % request.StagesEvery == 0)
        {
            using Mat sheet = OverlayRenderer.CreateStageSheet(ws);
            Save(SafeRelativePath.Under(sdir, stem, ".stages.png"), sheet);
        }
    }

    private static void Save(string path, Mat image)
    {
        if (!Cv2.ImEncode(".png", image, out byte[] png))
        {
            throw new IOException("cannot write " + path);
        }

        AtomicFile.WriteAllBytes(path, png);
    }

    /// <summary>The options with the metric view's section stated (its defaults when the preset leaves it out): a camera run uses it.</summary>
    private static PipelineOptions WithMetricView(PipelineOptions options) => options with { Metric = options.Metric ?? new MetricViewOptions() };

    private string ConfigText()
    {
        var text = new StringBuilder();
        text.Append("# Effective configuration of a lanebaseline detect run (preset or file: ").Append(request.ConfigSource).Append(").\n");
        text.Append("# Every record of ").Append(Path.GetFileName(request.Output)).Append(" carries \"config\": \"").Append(configHash)
            .Append("\" (SHA-256 of the YAML below, first 16 hex digits).\n");
        if (request.Camera is not null)
        {
            text.Append("# The hash also covers the camera file given with --camera (").Append(request.CameraPath).Append("), reproduced here:\n");
            foreach (string line in request.Camera.ToJson().Split('\n'))
            {
                text.Append("#   ").Append(line.TrimEnd('\r')).Append('\n');
            }
        }

        text.Append(PresetLoader.ToYaml(request.Camera is null ? request.Options : WithMetricView(request.Options)));
        return text.ToString();
    }

    /// <summary>
    /// Reads the frames already written to the (locked) output being continued, drops an unterminated last line, and
    /// checks they used this configuration; leaves the stream at its end.
    /// </summary>
    private HashSet<string> ReadResumeState(Stream stream)
    {
        var done = new HashSet<string>(StringComparer.Ordinal);
        if (!stream.CanRead || !stream.CanSeek)
        {
            return done; // a FIFO or device written in place has nothing to continue
        }

        stream.SetLength(CompleteLinesLength(stream));
        stream.Seek(0, SeekOrigin.Begin);
#pragma warning disable IDISP004 // the reader owns the view it is given; ReadOnlyView leaves the AtomicFile's stream open
        using (var reader = LaneFileReader.FromStream(new ReadOnlyView(stream), request.Output, sizeRequired: false))
#pragma warning restore IDISP004
        {
            foreach (LaneRecord r in reader.ReadAll())
            {
                string? hash = r.ExtraJson.FirstOrDefault(kv => kv.Key == "config").Value;
                if (hash != configJson)
                {
                    throw BadInputException.At(request.Output, r.LineNumber, "config", "--resume: this record was written with another configuration (" + (hash ?? "none") + ", now " + configJson + ")");
                }

                done.Add(r.Frame);
            }
        }

        stream.Seek(0, SeekOrigin.End);
        return done;
    }

    /// <summary>The length up to and including the last line ending, found by reading backwards from the end.</summary>
    private static long CompleteLinesLength(Stream stream)
    {
        byte[] block = new byte[1 << 16];
        long end = stream.Length;
        while (end > 0)
        {
            int n = (int)Math.Min(block.Length, end);
            stream.Seek(end - n, SeekOrigin.Begin);
            stream.ReadExactly(block, 0, n);
            int nl = Array.LastIndexOf(block, (byte)'\n', n - 1, n);
            if (nl >= 0)
            {
                return end - n + nl + 1;
            }

            end -= n;
        }

        return 0;
    }

    /// <summary>A read-only view that leaves the underlying stream open when disposed.</summary>
    private sealed class ReadOnlyView(Stream inner) : Stream
    {
        public override bool CanRead => true;

        public override bool CanSeek => false;

        public override bool CanWrite => false;

        public override long Length => inner.Length;

        public override long Position { get => inner.Position; set => throw new NotSupportedException(); }

        public override void Flush()
        {
        }

        public override int Read(byte[] buffer, int offset, int count) => inner.Read(buffer, offset, count);

        public override int Read(Span<byte> buffer) => inner.Read(buffer);

        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();
    }
}
