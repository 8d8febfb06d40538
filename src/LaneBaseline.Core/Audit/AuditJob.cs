using System.Text.Json;

namespace LaneBaseline.Core.Audit;

/// <summary>
/// One audit job: its inputs and every setting that changes a finding or an output. <c>audit --partial</c> writes it
/// whole into the state header (<see cref="AuditJobJson"/>) and <c>merge</c> reads it back whole, so every setting of
/// <see cref="AuditSettings"/> — including one added later — reaches the merged outputs, and the shards of one job are
/// compared on every one of them (<see cref="Entries"/>).
/// </summary>
public sealed record AuditJob
{
    /// <summary>Predictions as given (a mask folder, an OpenLABEL file or a lane file).</summary>
    public required string Pred { get; init; }

    /// <summary>Content hash of the predictions (<see cref="IO.ContentHash"/>); null outside a state.</summary>
    public string? PredSha256 { get; init; }

    /// <summary>Baseline predictions as given, or null.</summary>
    public string? Baseline { get; init; }

    /// <summary>Content hash of the baseline, or null (no baseline, or outside a state).</summary>
    public string? BaselineSha256 { get; init; }

    /// <summary>Fewest mask rows a lane id must cover to become a lane (mask-folder inputs; default 10).</summary>
    public int MinMaskRows { get; init; } = 10;

    /// <summary>The rules' settings, the camera included.</summary>
    public required AuditSettings Settings { get; init; }

    /// <summary>
    /// The job as (name, canonical JSON value) pairs, one per leaf of its serialised form (<c>settings.fps</c>-style
    /// dotted names, in declaration order): the serialiser walks every property, so a new setting is compared without
    /// anyone listing it.
    /// </summary>
    public IReadOnlyList<KeyValuePair<string, string>> Entries()
    {
        using JsonDocument doc = JsonSerializer.SerializeToDocument(this, AuditJobJson.Context.AuditJob);
        var entries = new List<KeyValuePair<string, string>>();
        Flatten(doc.RootElement, string.Empty, entries);
        return entries;
    }

    private static void Flatten(JsonElement e, string prefix, List<KeyValuePair<string, string>> sink)
    {
        if (e.ValueKind == JsonValueKind.Object)
        {
#pragma warning disable IDISP004 // foreach disposes the JsonElement.ObjectEnumerator
            foreach (JsonProperty p in e.EnumerateObject())
#pragma warning restore IDISP004
            {
                Flatten(p.Value, prefix.Length == 0 ? p.Name : prefix + "." + p.Name, sink);
            }
        }
        else
        {
            sink.Add(new(prefix, e.ValueKind == JsonValueKind.String ? e.GetString()! : e.GetRawText()));
        }
    }
}
