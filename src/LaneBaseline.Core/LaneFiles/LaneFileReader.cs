using System.Globalization;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// Streams a lane file (<c>*.lanes.jsonl</c>, lane-file specification version 1) one record at a time; the
/// whole file is never held in memory. Blank lines are skipped; every violation throws
/// <see cref="BadInputException"/> with the message <c>FILE:LINE: key: problem</c>.
/// </summary>
public sealed class LaneFileReader : ILaneRecordSource
{
    private readonly ByteLineReader lines;
    private readonly Dictionary<string, long> seenFrames = new(StringComparer.Ordinal);
    private readonly bool sizeRequired;

    private LaneFileReader(string displayName, Stream stream, bool sizeRequired)
    {
        DisplayName = displayName;
        lines = new ByteLineReader(stream, displayName);
        this.sizeRequired = sizeRequired;
    }

    /// <summary>The file name used in messages.</summary>
    public string DisplayName { get; }

    /// <summary>When true, <see cref="RawLine"/> holds the exact bytes of the last record read (for verbatim copies).</summary>
    public bool KeepRawLine { get; init; }

    /// <summary>The last record's line without its line ending, when <see cref="KeepRawLine"/> is set.</summary>
    public byte[]? RawLine { get; private set; }

    /// <summary>Number of records read so far.</summary>
    public long RecordCount { get; private set; }

    /// <summary>Opens a lane file for reading.</summary>
    /// <param name="path">Path as the user gave it (used in messages).</param>
    /// <param name="sizeRequired">True for ground truth, where <c>width</c> and <c>height</c> are required.</param>
    /// <returns>A reader the caller owns.</returns>
    public static LaneFileReader Open(string path, bool sizeRequired) => Open(path, sizeRequired, keepRawLine: false);

    /// <summary>Opens a lane file for reading, optionally keeping each record's raw line.</summary>
    public static LaneFileReader Open(string path, bool sizeRequired, bool keepRawLine)
    {
        if (Directory.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "is a directory, expected a lane file (*.lanes.jsonl)");
        }

        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "file not found");
        }

        try
        {
            return new LaneFileReader(path, new FileStream(IO.InputSpool.ReadablePath(path), FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan), sizeRequired)
            {
                KeepRawLine = keepRawLine,
            };
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot be opened: " + ex.Message);
        }
    }

    /// <summary>Reads from an already-open stream, which the reader then owns.</summary>
    public static LaneFileReader FromStream(Stream stream, string displayName, bool sizeRequired) =>
        new(displayName, stream, sizeRequired);

    /// <summary>Reads the next record, or returns false at the end of the file.</summary>
    public bool TryRead(out LaneRecord record)
    {
        while (lines.TryReadLine(out ReadOnlySpan<byte> line))
        {
            if (lines.LineNumber == 1 && line.StartsWith("\uFEFF"u8))
            {
                line = line[3..];
            }

            if (line.Trim(" \t"u8).IsEmpty)
            {
                continue;
            }

            record = LaneRecordParser.Parse(line, DisplayName, lines.LineNumber, sizeRequired);
            if (KeepRawLine)
            {
                RawLine = line.ToArray();
            }

            if (!seenFrames.TryAdd(record.Frame, record.LineNumber))
            {
                throw BadInputException.At(
                    DisplayName,
                    record.LineNumber,
                    "frame",
                    $"duplicate frame '{record.Frame}' (first on line {seenFrames[record.Frame].ToString(CultureInfo.InvariantCulture)})");
            }

            RecordCount++;
            return true;
        }

        record = null!;
        return false;
    }

    /// <summary>Enumerates the remaining records.</summary>
    public IEnumerable<LaneRecord> ReadAll()
    {
        while (TryRead(out LaneRecord record))
        {
            yield return record;
        }
    }

    /// <inheritdoc />
    public void Dispose() => lines.Dispose();

    /// <summary>
    /// Reads a whole labelled truth file into memory (tune and its calibration fit need every frame): sizes required,
    /// each frame key once, at least one frame.
    /// </summary>
    /// <exception cref="BadInputException">The file is missing, malformed, repeats a frame or holds none.</exception>
    public static List<LaneRecord> ReadTruth(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "no such truth file");
        }

        var records = new List<LaneRecord>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        using var reader = Open(path, sizeRequired: true);
        foreach (LaneRecord r in reader.ReadAll())
        {
            if (!seen.Add(r.Frame))
            {
                throw BadInputException.At(path, r.LineNumber, "frame", "frame '" + r.Frame + "' appears twice");
            }

            records.Add(r);
        }

        if (records.Count == 0)
        {
            throw BadInputException.At(path, 0, null, "the truth file holds no frame");
        }

        return records;
    }
}
