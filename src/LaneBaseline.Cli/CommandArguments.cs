using System.Globalization;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Cli;

/// <summary>Option values shared by several commands (systems, IoU thresholds, quality gates), parsed one way.</summary>
internal static class CommandArguments
{
    internal static IReadOnlyList<IouThreshold> ParseThresholds(IEnumerable<string> values)
    {
        var list = new List<IouThreshold>();
        foreach (string v in values)
        {
            foreach (string part in v.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
            {
                try
                {
                    list.Add(IouThreshold.Parse(part));
                }
                catch (FormatException ex)
                {
                    throw new UsageException("--iou: " + ex.Message);
                }
            }
        }

        return list;
    }

    /// <summary>Parses <c>--pred [NAME=]FILE</c> values; with <paramref name="stdin"/>, <c>-</c> reads standard input (named "stdin" unless named).</summary>
    internal static IReadOnlyList<ScoredSystem> ParseSystems(string[] values, bool stdin = false)
    {
        var systems = new List<ScoredSystem>();
        foreach (string v in values)
        {
            int eq = v.IndexOf('=', StringComparison.Ordinal);
            string name, path;
            if (eq > 0 && v[..eq].IndexOfAny(['/', '\\']) < 0)
            {
                name = v[..eq];
                path = v[(eq + 1)..];
            }
            else
            {
                path = v;
                name = Path.GetFileName(v);
                foreach (string suffix in new[] { ".lanes.jsonl", ".jsonl" })
                {
                    if (name.EndsWith(suffix, StringComparison.OrdinalIgnoreCase) && name.Length > suffix.Length)
                    {
                        name = name[..^suffix.Length];
                        break;
                    }
                }
            }

            if (path.Length == 0)
            {
                throw new UsageException($"--pred {v}: no file after '='");
            }

            if (systems.Any(s => s.Name == name))
            {
                throw new UsageException($"--pred: the name '{name}' is given twice; name systems as NAME=FILE");
            }

            if (StandardStreams.IsDash(path))
            {
                if (!stdin)
                {
                    throw new UsageException("--pred -: standard input is read by score and audit only");
                }

                name = name == StandardStreams.Dash ? "stdin" : name;
                path = InputSpool.Input(path);
            }

            systems.Add(new ScoredSystem(name, path));
        }

        return systems;
    }

    /// <summary>The <c>--fail-on</c> value: none (null), warning or error.</summary>
    internal static AuditSeverity? ParseGate(string text) => text.ToLowerInvariant() switch
    {
        "none" => null,
        "warning" => AuditSeverity.Warning,
        "error" => AuditSeverity.Error,
        _ => throw new UsageException("--fail-on must be none, warning or error"),
    };

    /// <summary>A frame size to make or process at, <c>WxH</c> with each side 64–8192 pixels (render, bench).</summary>
    internal static (int Width, int Height) ParseFrameSize(string text)
    {
        string[] parts = text.Split('x', 'X');
        if (parts.Length != 2 ||
            !int.TryParse(parts[0], NumberStyles.None, CultureInfo.InvariantCulture, out int w) ||
            !int.TryParse(parts[1], NumberStyles.None, CultureInfo.InvariantCulture, out int h))
        {
            throw new UsageException($"--size must look like 1280x720, not '{text}'.");
        }

        if (w < 64 || h < 64 || w > 8192 || h > 8192)
        {
            throw new UsageException($"--size {w}x{h}: each side must be between 64 and 8192 pixels.");
        }

        return (w, h);
    }
}
