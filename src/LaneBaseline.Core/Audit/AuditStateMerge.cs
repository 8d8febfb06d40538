using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core.Sharding;

namespace LaneBaseline.Core.Audit;

/// <summary>Merges partial audit states of shards 0..N−1 into the result of one unsharded run.</summary>
public static class AuditStateMerge
{
    /// <summary>
    /// Checks that the states belong to one job, cover every shard once and together audited every input frame, then
    /// ranks the union of their frames and findings as <see cref="AuditRun"/> does.
    /// </summary>
    /// <exception cref="BadInputException">A state is malformed, from another job, repeated or missing, or incomplete.</exception>
    public static (AuditStateHeader Header, AuditResult Result) Merge(IReadOnlyList<string> paths)
    {
        ArgumentNullException.ThrowIfNull(paths);
        if (paths.Count == 0)
        {
            throw new BadInputException("merge: no audit states given");
        }

        var findings = new List<AuditFinding>();
        var frames = new List<AuditFrameScore>();
        var ordinals = new Dictionary<long, string>();
        var headers = new List<AuditStateHeader>();
        foreach (string path in paths)
        {
            headers.Add(Read(path, frames, findings, ordinals));
        }

        IReadOnlyList<KeyValuePair<string, string>> firstJob = headers[0].Job.Entries();
        for (int i = 1; i < headers.Count; i++)
        {
            // Name the first setting that differs (a content hash: the same path held other contents).
            IReadOnlyList<KeyValuePair<string, string>> job = headers[i].Job.Entries();
            for (int k = 0; k < firstJob.Count && k < job.Count; k++)
            {
                (string name, string value) = firstJob[k];
                string other = job[k].Value;
                if (!string.Equals(other, value, StringComparison.Ordinal))
                {
                    string what = name.EndsWith("_sha256", StringComparison.Ordinal)
                        ? $"belongs to a different audit job than {paths[0]}: it was made from different contents of {firstJob.FirstOrDefault(kv => kv.Key == name[..^7]).Value} ({other} vs {value}); re-run every shard on the same inputs"
                        : $"belongs to a different audit job than {paths[0]}: its {name} is '{other}' where that state's is '{value}'";
                    throw BadInputException.At(paths[i], 1, name, what);
                }
            }
        }

        ShardCoverage.Check(paths, [.. headers.Select(h => (h.Shard, h.JobKey()))], "audit ", "inputs, settings, input frames or shard count");
        AuditStateHeader first = headers[0];
        long audited = headers.Sum(h => h.Frames), compared = headers.Sum(h => h.ComparedFrames);
        if (audited != first.InputFrames)
        {
            throw new BadInputException(string.Create(CultureInfo.InvariantCulture, $"merge: the audit states cover {audited} frames but the predictions hold {first.InputFrames} ({BadInputException.Files(paths)})"));
        }

        var result = new AuditResult { Frames = audited, InputFrames = first.InputFrames, ComparedFrames = compared };
        AuditRun.Rank(result, findings, frames);
        return (first, result);
    }

    private static AuditStateHeader Read(string path, List<AuditFrameScore> frames, List<AuditFinding> findings, Dictionary<long, string> ordinals)
    {
        AuditStateHeader? header = null;
        long line = 0;
        string? key = null;
        try
        {
            using var reader = new StreamReader(IO.InputSpool.ReadablePath(path), new System.Text.UTF8Encoding(false, true));
            while (reader.ReadLine() is string text)
            {
                line++;
                key = null;
                using var doc = JsonDocument.Parse(text);
                JsonElement r = doc.RootElement;
                if (header is null)
                {
                    key = "format";
                    if (r.ValueKind != JsonValueKind.Object || !r.TryGetProperty("format", out JsonElement fmt) || fmt.GetString() != AuditStateHeader.FormatName)
                    {
                        throw BadInputException.At(path, line, "format", $"not an audit state (expected \"format\": \"{AuditStateHeader.FormatName}\")");
                    }

                    // "schema_version" since 2026-12-05 (docs/schema/audit-state.schema.json); "version" before.
                    key = r.TryGetProperty("schema_version", out _) ? "schema_version" : "version";
                    int version = r.GetProperty(key).GetInt32();
                    if (version == 1)
                    {
                        throw BadInputException.At(path, line, key, "an audit state of an older build (version 1, which lost settings such as --fps, --design-speed-kmh and --horizon-row in merge); re-run the shards' audits with this build");
                    }

                    if (version != AuditStateHeader.Version)
                    {
                        throw BadInputException.At(path, line, key, string.Create(CultureInfo.InvariantCulture, $"unsupported version {version} (this build reads {AuditStateHeader.Version})"));
                    }

                    key = "shard_count";
                    int count = r.GetProperty(key).GetInt32();
                    key = "shard_index";
                    int index = r.GetProperty(key).GetInt32();
                    if (count < 1 || index < 0 || index >= count)
                    {
                        throw BadInputException.At(path, line, key, "shard index must be in 0..shard_count-1");
                    }

                    key = "job";
                    AuditJob job = AuditJobJson.Read(r.GetProperty(key));
                    if (job.MinMaskRows < 2)
                    {
                        throw BadInputException.At(path, line, key, "min_mask_rows must be at least 2");
                    }

                    key = "input_frames";
                    long input = r.GetProperty(key).GetInt64();
                    key = "frames";
                    long audited = r.GetProperty(key).GetInt64();
                    key = "compared_frames";
                    long compared = r.GetProperty(key).GetInt64();
                    header = new AuditStateHeader { Shard = new ShardSpec(index, count), Job = job, InputFrames = input, Frames = audited, ComparedFrames = compared };
                    continue;
                }

                key = "t";
                string kind = r.GetProperty(key).GetString() ?? string.Empty;
                key = "frame";
                string frame = r.GetProperty(key).GetString() ?? throw new FormatException("must be a string");
                key = "ordinal";
                long ordinal = r.GetProperty(key).GetInt64();
                if (ordinal < 0 || ordinal >= header.InputFrames)
                {
                    throw BadInputException.At(path, line, key, "outside the prediction file");
                }

                if (ordinals.TryGetValue(ordinal, out string? owner) && owner != path)
                {
                    throw BadInputException.At(path, line, key, $"frame position {ordinal} also appears in {owner}");
                }

                ordinals[ordinal] = path;
                switch (kind)
                {
                    case "frame":
                        key = "disagreement";
                        frames.Add(new AuditFrameScore(frame, ordinal, 0, ReadDouble(r.GetProperty(key))));
                        break;
                    case "finding":
                        key = "rule";
                        string rule = r.GetProperty(key).GetString() ?? string.Empty;
                        if (!AuditRules.All.Any(x => x.Id == rule))
                        {
                            throw new FormatException($"unknown rule '{rule}'");
                        }

                        key = "severity";
                        AuditSeverity severity = r.GetProperty(key).GetString() switch
                        {
                            "error" => AuditSeverity.Error,
                            "warning" => AuditSeverity.Warning,
                            "info" => AuditSeverity.Info,
                            _ => throw new FormatException("must be error, warning or info"),
                        };
                        key = "lane";
                        int? lane = ReadInt(r.GetProperty(key));
                        key = "other_lane";
                        int? other = ReadInt(r.GetProperty(key));
                        key = "value";
                        double value = ReadDouble(r.GetProperty(key)) ?? throw new FormatException("must be a number");
                        key = "limit";
                        double limit = ReadDouble(r.GetProperty(key)) ?? throw new FormatException("must be a number");
                        key = "unit";
                        string unit = r.GetProperty(key).GetString() ?? string.Empty;
                        key = "message";
                        string message = r.GetProperty(key).GetString() ?? string.Empty;
                        findings.Add(new AuditFinding(frame, ordinal, rule, severity, lane, other, value, limit, unit, message));
                        break;
                    default:
                        throw BadInputException.At(path, line, "t", $"unknown line type '{kind}' (frame or finding)");
                }

                if (!header.Shard.ContainsFrame(frame))
                {
                    throw BadInputException.At(path, line, "frame", $"frame '{frame}' does not belong to shard {header.Shard} (a foreign frame key)");
                }
            }
        }
        catch (BadInputException)
        {
            throw;
        }
        catch (System.Text.DecoderFallbackException)
        {
            throw BadInputException.At(path, line + 1, null, "not valid UTF-8 text");
        }
        catch (Exception ex) when (ex is JsonException or InvalidOperationException or KeyNotFoundException or FormatException or ArgumentException or OverflowException)
        {
            throw BadInputException.At(path, line, key, ex is KeyNotFoundException ? "missing" : ex.Message);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, ex is FileNotFoundException ? "file not found" : ex.Message);
        }

        return header ?? throw BadInputException.At(path, 0, null, "empty file: not an audit state");
    }

    private static int? ReadInt(JsonElement e) => e.ValueKind == JsonValueKind.Null ? null : e.GetInt32();

    private static double? ReadDouble(JsonElement e) => e.ValueKind switch
    {
        JsonValueKind.Null => null,
        JsonValueKind.String => double.Parse(e.GetString()!, NumberStyles.Float, CultureInfo.InvariantCulture),
        _ => e.GetDouble(),
    };
}
