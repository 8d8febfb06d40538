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

            Save(Path.Combine(dir, Path.ChangeExtension(stem, ".png")), canvas);
        }

        if (request.StagesDir is string sdir && item.Index % request.StagesEvery == 0)
        {
            using Mat sheet = OverlayRenderer.CreateStageSheet(ws);
            Save(Path.Combine(sdir, Path.ChangeExtension(stem, null) + ".stages.png"), sheet);
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

    private void WriteConfig(string path)
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

        text.Append(PresetLoader.ToYaml(request.Options));
        AtomicFile.WriteAllText(path, text.ToString());
    }

    /// <summary>Reads the frames already written, streaming (after dropping an unterminated last line), and checks they used this configuration.</summary>
    private HashSet<string> ReadResumeState()
    {
        var done = new HashSet<string>(StringComparer.Ordinal);
        if (!File.Exists(request.Output))
        {
            return done;
        }

        LaneFileTail.TrimUnterminatedLine(request.Output); // streamed from the end: bounded memory whatever the file size
        using var reader = LaneFileReader.Open(request.Output, sizeRequired: false);
        foreach (LaneRecord r in reader.ReadAll())
        {
            string? hash = r.ExtraJson.FirstOrDefault(kv => kv.Key == "config").Value;
            if (hash != configJson)
            {
                throw BadInputException.At(request.Output, r.LineNumber, "config", "--resume: this record was written with another configuration (" + (hash ?? "none") + ", now " + configJson + ")");
            }

            done.Add(r.Frame);
        }

        return done;
    }
}
