using System.Text;
using System.Text.Json;
using LaneBaseline.Core;
using LaneBaseline.Core.Audit;

namespace LaneBaseline.Reporting.Audit;

/// <summary>One row of the per-rule table: how often a rule fired and on how many frames.</summary>
/// <param name="Id">Rule id.</param>
/// <param name="Name">Rule name.</param>
/// <param name="Severity">Severity name (error, warning, info).</param>
/// <param name="Findings">Findings of the rule.</param>
/// <param name="Frames">Distinct frames with a finding of the rule.</param>
public sealed record AuditRuleCount(string Id, string Name, string Severity, long Findings, long Frames);

/// <summary>One of the first findings of the file (the file is ranked worst frame first).</summary>
/// <param name="Rank">Frame rank (1 = worst).</param>
/// <param name="Frame">Frame key.</param>
/// <param name="Rule">Rule id.</param>
/// <param name="Severity">Severity name.</param>
/// <param name="Lane">Lane index, or null for the whole frame.</param>
/// <param name="Value">Measured value.</param>
/// <param name="Limit">The limit it broke.</param>
/// <param name="Unit">Unit of value and limit.</param>
/// <param name="Message">The finding's sentence.</param>
public sealed record AuditTopFinding(long Rank, string Frame, string Rule, string Severity, int? Lane, double Value, double Limit, string Unit, string Message);

/// <summary>What the report shows of an audit: counts per rule and the first findings.</summary>
/// <param name="Source">The findings file as the user named it.</param>
/// <param name="Findings">Number of findings (lines).</param>
/// <param name="FlaggedFrames">Distinct frames with at least one finding.</param>
/// <param name="Rules">Every catalogue rule in catalogue order, then rules unknown to this version in id order.</param>
/// <param name="Top">The first findings of the file, in file (rank) order.</param>
public sealed record AuditSummary(string Source, long Findings, long FlaggedFrames, IReadOnlyList<AuditRuleCount> Rules, IReadOnlyList<AuditTopFinding> Top)
{
    /// <summary>Thumbnails of the overlays <c>audit --overlay-count</c> drew, worst frame first (empty when none).</summary>
    public IReadOnlyList<AuditThumbnail> Thumbnails { get; init; } = [];
}

/// <summary>A small JPEG of one overlay the audit drew, embedded in the page, and a link to the full-size file.</summary>
/// <param name="Rank">1 for the worst frame.</param>
/// <param name="Frame">Frame key.</param>
/// <param name="Href">The full-size overlay relative to the page (URL-escaped), or null.</param>
/// <param name="Jpeg">Encoded thumbnail.</param>
/// <param name="Width">Thumbnail width, px.</param>
/// <param name="Height">Thumbnail height, px.</param>
public sealed record AuditThumbnail(int Rank, string Frame, string? Href, ReadOnlyMemory<byte> Jpeg, int Width, int Height);

/// <summary>
/// Reads an <c>audit</c> findings file (JSON Lines) one line at a time: memory holds the per-rule counters, the set of
/// flagged frame keys and the first <c>top</c> findings, never the whole file. Every problem throws
/// <see cref="BadInputException"/> naming the file and line.
/// </summary>
public static class AuditFindingsReader
{
    /// <summary>How many findings the report lists by default (all of them up to this bound, grouped by frame; the
    /// findings file keeps the rest, and the page says how many it left out).</summary>
    public const int DefaultTop = 5000;

    /// <summary>Reads and summarises a findings file.</summary>
    public static AuditSummary Read(string path, int top = DefaultTop)
    {
        ArgumentNullException.ThrowIfNull(path);
        if (Directory.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "is a directory, expected an audit findings file (JSON Lines)");
        }

        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "file not found");
        }

        try
        {
            using var reader = new StreamReader(path, new UTF8Encoding(false, true), detectEncodingFromByteOrderMarks: true);
            return Read(reader, path, top);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or DecoderFallbackException)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }
    }

    /// <summary>Summarises findings from a reader; <paramref name="displayName"/> names the source in errors.</summary>
    public static AuditSummary Read(TextReader reader, string displayName, int top = DefaultTop)
    {
        ArgumentNullException.ThrowIfNull(reader);
        ArgumentNullException.ThrowIfNull(displayName);
        var counts = new Dictionary<string, (string Name, string Severity, long Findings, HashSet<string> Frames)>(StringComparer.Ordinal);
        var flagged = new HashSet<string>(StringComparer.Ordinal);
        var first = new List<AuditTopFinding>();
        long lineNo = 0, findings = 0;
        string? line;
        while ((line = reader.ReadLine()) is not null)
        {
            lineNo++;
            if (string.IsNullOrWhiteSpace(line))
            {
                continue;
            }

            AuditTopFinding f = ParseLine(line, displayName, lineNo, out string name);
            findings++;
            flagged.Add(f.Frame);
            if (!counts.TryGetValue(f.Rule, out var c))
            {
                c = (name, f.Severity, 0, new HashSet<string>(StringComparer.Ordinal));
            }

            c.Frames.Add(f.Frame);
            counts[f.Rule] = (c.Name, c.Severity, c.Findings + 1, c.Frames);
            if (first.Count < top)
            {
                first.Add(f);
            }
        }

        var rules = new List<AuditRuleCount>();
        foreach (AuditRuleInfo rule in AuditRules.All)
        {
            counts.TryGetValue(rule.Id, out var c);
            rules.Add(new AuditRuleCount(rule.Id, rule.Name, AuditJsonWriter.SeverityName(rule.Severity), c.Findings, c.Frames?.Count ?? 0));
        }

        foreach (KeyValuePair<string, (string Name, string Severity, long Findings, HashSet<string> Frames)> kv in counts.Where(kv => !AuditRules.All.Any(r => r.Id == kv.Key)).OrderBy(kv => kv.Key, StringComparer.Ordinal))
        {
            rules.Add(new AuditRuleCount(kv.Key, kv.Value.Name, kv.Value.Severity, kv.Value.Findings, kv.Value.Frames.Count));
        }

        return new AuditSummary(displayName, findings, flagged.Count, rules, first);
    }

    private static AuditTopFinding ParseLine(string line, string file, long lineNo, out string name)
    {
        JsonDocument doc;
        try
        {
            doc = JsonDocument.Parse(line);
        }
        catch (JsonException ex)
        {
            throw BadInputException.At(file, lineNo, null, "malformed JSON (" + ex.Message.Split(". ")[0] + ")");
        }

        using (doc)
        {
            JsonElement o = doc.RootElement;
            if (o.ValueKind != JsonValueKind.Object)
            {
                throw BadInputException.At(file, lineNo, null, "expected one JSON object per line (a finding)");
            }

            name = Str(o, "name", file, lineNo);
            string severity = Str(o, "severity", file, lineNo);
            if (severity is not ("error" or "warning" or "info"))
            {
                throw BadInputException.At(file, lineNo, "severity", $"'{severity}' is not error, warning or info");
            }

            int? lane = o.TryGetProperty("lane", out JsonElement l) && l.ValueKind == JsonValueKind.Number && l.TryGetInt32(out int li) ? li : null;
            return new AuditTopFinding(
                Num(o, "rank", file, lineNo) is double r && r >= 1 && r == Math.Floor(r) ? (long)r : throw BadInputException.At(file, lineNo, "rank", "must be a whole number of at least 1"),
                Str(o, "frame", file, lineNo),
                Str(o, "rule", file, lineNo),
                severity,
                lane,
                Num(o, "value", file, lineNo),
                Num(o, "limit", file, lineNo),
                o.TryGetProperty("unit", out JsonElement u) && u.ValueKind == JsonValueKind.String ? u.GetString()! : string.Empty,
                o.TryGetProperty("message", out JsonElement m) && m.ValueKind == JsonValueKind.String ? m.GetString()! : string.Empty);
        }
    }

    private static string Str(JsonElement o, string key, string file, long line) =>
        o.TryGetProperty(key, out JsonElement e) && e.ValueKind == JsonValueKind.String && e.GetString() is { Length: > 0 } s
            ? s
            : throw BadInputException.At(file, line, key, "missing or not a non-empty string");

    private static double Num(JsonElement o, string key, string file, long line) =>
        o.TryGetProperty(key, out JsonElement e) && e.ValueKind == JsonValueKind.Number && e.TryGetDouble(out double d) && double.IsFinite(d)
            ? d
            : throw BadInputException.At(file, line, key, "missing or not a finite number");
}
