using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using OpenCvSharp;

namespace LaneBaseline.Vision.Masks;

/// <summary>
/// Reads a folder of per-frame instance-mask PNGs as lane records, one mask at a time (<see cref="MaskFiles"/> gives
/// the layout). With a reference (the truth when scoring) a mask maps back to the frame key whose mask path it is and
/// is rescaled to that frame's size; otherwise the key is the mask's relative path and the size is <c>--size</c> or
/// the mask's own. Lanes come from <see cref="MaskLaneExtractor"/>.
/// </summary>
public sealed class MaskFolderSource : ILaneRecordSource
{
    private readonly string dir;
    private readonly List<string> files;
    private readonly Dictionary<string, string>? keyByMask;
    private readonly LaneSourceRequest request;
    private readonly MaskLaneExtractor extractor;
    private readonly List<(int Id, int Rows)> dropped = [];
    private int next;

    /// <summary>Opens a folder; throws <see cref="BadInputException"/> when it holds no mask PNG.</summary>
    public MaskFolderSource(string dir, LaneSourceRequest request, MaskLaneExtractor? extractor = null)
    {
        ArgumentNullException.ThrowIfNull(request);
        this.dir = dir;
        this.request = request;
        this.extractor = extractor ?? new MaskLaneExtractor();
        if (!Directory.Exists(dir))
        {
            throw BadInputException.At(dir, 0, null, "folder not found");
        }

        files = MaskFiles.List(dir);
        if (files.Count == 0)
        {
            throw BadInputException.At(dir, 0, null, "is a directory with no mask PNGs; expected a lane file (*.lanes.jsonl) or a folder of instance masks DIR/<frame key with .png>");
        }

        if (request.Reference is { } reference)
        {
            keyByMask = new Dictionary<string, string>(reference.Count, StringComparer.Ordinal);
            foreach (string key in reference.Keys)
            {
                if (!keyByMask.TryAdd(MaskFiles.MaskKeyFor(key), key))
                {
                    // two reference frames ('a.jpg', 'a.png') share one mask path: which frame a mask belongs to is unknowable
                    throw BadInputException.At(dir, 0, null, $"the reference frames '{keyByMask[MaskFiles.MaskKeyFor(key)]}' and '{key}' map to the same mask {MaskFiles.MaskKeyFor(key)}");
                }
            }
        }
    }

    /// <inheritdoc />
    public string DisplayName => dir;

    /// <inheritdoc />
    public long RecordCount { get; private set; }

    /// <summary>Called with a one-line note for every lane id dropped for covering too few rows.</summary>
    public Action<string>? OnNote { get; init; }

    /// <inheritdoc />
    public bool TryRead(out LaneRecord record)
    {
        if (next >= files.Count)
        {
            record = null!;
            return false;
        }

        string rel = files[next++];
        string path = Path.Combine(dir, rel);
        string frame = keyByMask is not null && keyByMask.TryGetValue(rel, out string? k) ? k : rel;
        using Mat mask = MaskFiles.Read(path);
        (int w, int h) = request.Reference is { } r && r.TryGetValue(frame, out var size) ? size
            : request.Size ?? (mask.Cols, mask.Rows);
        dropped.Clear();
        IReadOnlyList<Lane> lanes = extractor.Extract(mask, w, h, dropped, path);
        foreach ((int id, int rows) in dropped)
        {
            OnNote?.Invoke(string.Create(CultureInfo.InvariantCulture, $"{path}: lane id {id} covers {rows} row(s), fewer than {extractor.MinRows}; dropped"));
        }

        record = new LaneRecord { Frame = frame, Width = w, Height = h, Lanes = lanes };
        RecordCount++;
        return true;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
