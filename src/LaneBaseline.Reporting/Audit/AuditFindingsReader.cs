using System.Text;
using System.Text.Json;
using LaneBaseline.Core;
using LaneBaseline.Core.Audit;

namespace LaneBaseline.Reporting.Audit;

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
