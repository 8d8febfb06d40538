using System.CommandLine;
using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.Interchange;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Vision.Masks;
using OpenCvSharp;

namespace LaneBaseline.Cli.Commands;

/// <summary><c>lanebaseline convert</c>: lane file ⇄ instance-mask PNG folder ⇄ ASAM OpenLABEL 1.0 JSON.</summary>
internal static class ConvertCommand
{
    public static Command Create()
    {
        Argument<string> input = new("INPUT") { Description = "A lane file (*.lanes.jsonl), a folder of instance-mask PNGs, or an OpenLABEL file (*.json); '-' reads standard input." };
        Option<string> output = SharedOptions.Output("Output: *.jsonl lane file, *.json OpenLABEL file, or a folder for masks; '-' writes a lane file (or --to openlabel) to standard output.");
        Option<string> legacyOut = SharedOptions.LegacyOut();
        Option<string?> to = new("--to") { Description = "Output format: lanes, masks or openlabel (default: from the output name)." };
        Option<string?> reference = new("--reference") { Description = "Lane file whose frame keys and sizes name and size the frames of a mask folder or an OpenLABEL file without them." };
        Option<string?> size = new("--size") { Description = "Frame size WxH for inputs that do not carry one (masks are rescaled to it)." };
        Option<int?> maskWidth = new("--mask-width-px") { Description = "Line width when drawing masks (default round(30*width/1640), the IoU metric's width)." };
        Option<int> minRows = new("--min-mask-rows") { Description = "Fewest mask rows a lane id must cover to become a lane.", DefaultValueFactory = _ => 10 };

        Command command = new("convert", "Convert lanes between lane files, per-frame instance-mask PNG folders (DIR/<frame key with .png>) and ASAM OpenLABEL 1.0 poly2d JSON.")
        {
            input, output, to, reference, size, maskWidth, minRows,
        };
        SharedOptions.AddOutput(command, output, legacyOut, required: true);
        command.SetAction((parseResult, cancellationToken) => Task.FromResult(CommandRunner.Run(parseResult, (stdout, stderr) =>
        {
            string inPath = RunContext.Input(parseResult.GetRequiredValue(input));
            string outPath = SharedOptions.GetOutput(parseResult, output, legacyOut, stderr)!;
            string format = (parseResult.GetValue(to) ?? InferFormat(outPath)).ToLowerInvariant();
            if (format is not ("lanes" or "masks" or "openlabel"))
            {
                throw new UsageException("--to must be lanes, masks or openlabel");
            }

            OutputPaths.Check([("INPUT", inPath), ("--reference", parseResult.GetValue(reference))], [("--output", outPath)], outputsAreFiles: format != "masks");

            if (format == "masks" && StandardStreams.IsDash(outPath))
            {
                throw new UsageException("masks are written to a folder; -o - takes a lane file or --to openlabel");
            }

            int? width = parseResult.GetValue(maskWidth);
            if (width is <= 0)
            {
                throw new UsageException("--mask-width-px must be a positive whole number");
            }

            int rows = parseResult.GetValue(minRows);
            if (rows < 2)
            {
                throw new UsageException("--min-mask-rows must be at least 2");
            }

            return Execute(stdout, stderr, inPath, outPath, format, parseResult.GetValue(reference), LaneInputs.ParseSize(parseResult.GetValue(size), "--size"), width, rows, cancellationToken);
        })));
        return command;
    }

    private static string InferFormat(string outPath) =>
        StandardStreams.IsDash(outPath) ? "lanes"
        : outPath.EndsWith(".jsonl", StringComparison.OrdinalIgnoreCase) ? "lanes"
        : outPath.EndsWith(".json", StringComparison.OrdinalIgnoreCase) ? "openlabel"
        : "masks";

    private static int Execute(
        TextWriter stdout,
        TextWriter stderr,
        string inPath,
        string outPath,
        string format,
        string? referencePath,
        (int Width, int Height)? size,
        int? maskWidth,
        int minRows,
        CancellationToken cancellationToken)
    {
        if (!File.Exists(inPath) && !Directory.Exists(inPath))
        {
            throw BadInputException.At(inPath, 0, null, "file not found");
        }

        Dictionary<string, (int Width, int Height)>? reference = null;
        if (referencePath is not null)
        {
            reference = new Dictionary<string, (int Width, int Height)>(StringComparer.Ordinal);
            using LaneFileReader refReader = LaneFileReader.Open(referencePath, sizeRequired: true);
            while (refReader.TryRead(out LaneRecord r))
            {
                reference.Add(r.Frame, (r.Width!.Value, r.Height!.Value));
            }
        }

        var request = new LaneSourceRequest { SizeRequired = format == "masks" && size is null && reference is null, Reference = reference, Size = size };
        LaneSourceOpener opener = LaneInputs.Opener(size, minRows, stderr);
        long frames = 0, lanes = 0;
        using (ILaneRecordSource source = opener(inPath, request))
        {
            switch (format)
            {
                case "lanes":
                    WriteAtomically(outPath, stream =>
                    {
                        using var w = new LaneFileWriter(stream);
                        while (source.TryRead(out LaneRecord r))
                        {
                            cancellationToken.ThrowIfCancellationRequested();
                            w.Write(WithSize(r, reference, size));
                            frames++;
                            lanes += r.Lanes.Count;
                        }
                    });
                    break;
                case "openlabel":
                    WriteAtomically(outPath, stream =>
                    {
                        using var w = new OpenLabelWriter(stream);
                        while (source.TryRead(out LaneRecord r))
                        {
                            cancellationToken.ThrowIfCancellationRequested();
                            w.Write(WithSize(r, reference, size));
                            frames++;
                            lanes += r.Lanes.Count;
                        }

                        w.Complete();
                    });
                    break;
                default:
                    if (File.Exists(outPath))
                    {
                        throw new UsageException($"{outPath}: is a file; masks are written to a folder");
                    }

                    Directory.CreateDirectory(outPath);
                    var written = new Dictionary<string, (string Frame, long Line)>(StringComparer.Ordinal); // mask path -> first frame
                    while (source.TryRead(out LaneRecord r))
                    {
                        cancellationToken.ThrowIfCancellationRequested();
                        // A hostile key (absolute, or with '..') is confined to the output folder like every derived path.
                        string maskKey = MaskFiles.MaskKeyFor(r.Frame);
                        string maskPath = SafeRelativePath.Under(outPath, maskKey, null);
                        if (!written.TryAdd(maskPath, (r.Frame, r.LineNumber)))
                        {
                            (string first, long line) = written[maskPath];
                            throw BadInputException.At(source.DisplayName, r.LineNumber, "frame", $"frame '{r.Frame}' maps to the same mask {maskKey} as frame '{first}' (line {line}); mask folders need one image per frame name without its extension");
                        }

                        LaneRecord sized = WithSize(r, reference, size);
                        if (sized.Width is not int w || sized.Height is not int h)
                        {
                            throw BadInputException.At(source.DisplayName, r.LineNumber, "width", $"frame '{r.Frame}' has no size: give --size WxH or --reference");
                        }

                        int lw = maskWidth ?? new ScoreSettings().LaneWidthFor(w);
                        using Mat mask = LaneMaskPainter.Paint(sized.Lanes, w, h, lw);
                        MaskFiles.Write(maskPath, mask);
                        frames++;
                        lanes += r.Lanes.Count;
                    }

                    break;
            }
        }

        string where = StandardStreams.IsDash(outPath) ? "standard output" : outPath;
        stdout.WriteLine(string.Create(CultureInfo.InvariantCulture, $"convert: {frames} frames, {lanes} lanes -> {where} ({format})"));
        return ExitCodes.Success;
    }

    private static LaneRecord WithSize(LaneRecord r, Dictionary<string, (int Width, int Height)>? reference, (int Width, int Height)? size)
    {
        if (r.Width is not null && r.Height is not null)
        {
            return r;
        }

        (int Width, int Height)? s = reference is not null && reference.TryGetValue(r.Frame, out var rs) ? rs : size;
        return s is { } v
            ? new LaneRecord { Frame = r.Frame, Width = v.Width, Height = v.Height, Tags = r.Tags, Lanes = r.Lanes, ExtraJson = r.ExtraJson, LineNumber = r.LineNumber }
            : r;
    }

    private static void WriteAtomically(string path, Action<Stream> write)
    {
        using var file = new AtomicFile(path);
#pragma warning disable IDISP004 // the writer given the stream owns and disposes it; NonClosingStream only forwards
        write(new NonClosingStream(file.Stream));
#pragma warning restore IDISP004
        file.Commit();
    }
}
