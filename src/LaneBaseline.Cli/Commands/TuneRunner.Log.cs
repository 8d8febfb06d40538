using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Core.Tuning;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Cli.Commands;

/// <summary>Tune, part 4: the trial log (header, one JSON line per trial, resume from a partial log).</summary>
internal sealed partial class TuneRunner
{
    /// <summary>The <c>schema_version</c> of the trial log's first line (docs/schema/tune-log.schema.json).</summary>
    internal const int LogSchemaVersion = 1;

    /// <summary>
    /// First log line: the tool, the log's schema version and what the trials depend on; <c>--resume</c> refuses a log
    /// with another header. Logs written before 2026-12-05 start with the <c>run</c> object alone and are still resumed.
    /// </summary>
    private string LogHeader(List<Sample> tuning, PipelineOptions baseOptions) => LogHeader(tuning, baseOptions, legacy: false);

    private string LogHeader(List<Sample> tuning, PipelineOptions baseOptions, bool legacy)
    {
        string spaceText = string.Join("\n", space.Parameters.Select(p => string.Create(CultureInfo.InvariantCulture, $"{p.Key} {p.Min:R} {p.Max:R} {p.WholeNumbers} {p.Log}")));
        string frames = string.Join("\n", tuning.Select(s => s.Item.Key));
        using var buffer = new MemoryStream();
        using (var json = new Utf8JsonWriter(buffer))
        {
            json.WriteStartObject();
            if (!legacy)
            {
                json.WriteString("tool", "lanebaseline");
                json.WriteNumber("schema_version", LogSchemaVersion);
            }

            json.WriteStartObject("run");
            json.WriteString("objective", request.Objective);
            json.WriteNumber("seed", request.Seed);
            json.WriteNumber("budget", request.Budget);
            json.WriteString("space", ShortHash(spaceText));
            json.WriteString("base", PresetLoader.Hash(baseOptions));
            json.WriteString("tuning_frames", ShortHash(frames));
            json.WriteEndObject();
            json.WriteEndObject();
        }

        return Encoding.UTF8.GetString(buffer.ToArray());
    }

    private static string ShortHash(string text) =>
        "sha256:" + Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(text)).AsSpan(0, 8));

    private string TrialJson(Trial trial, TrialNote? note)
    {
        using var buffer = new MemoryStream();
        using (var json = new Utf8JsonWriter(buffer))
        {
            json.WriteStartObject();
            json.WriteNumber("index", trial.Index);
            json.WriteString("phase", trial.Phase);
            json.WriteStartObject("values");
            for (int k = 0; k < space.Parameters.Count; k++)
            {
                json.WriteNumber(space.Parameters[k].Key, trial.Values[k]);
            }

            json.WriteEndObject();
            json.WriteNumber("objective", trial.Score);
            json.WriteNumber("seconds", Math.Round(note?.Seconds ?? 0, 3));
            if (note?.Invalid is string why)
            {
                json.WriteString("invalid", why);
            }

            json.WriteEndObject();
        }

        return Encoding.UTF8.GetString(buffer.ToArray());
    }

    private static void WriteLine(FileStream log, string line)
    {
        log.Write(Encoding.UTF8.GetBytes(line + "\n"));
        log.Flush(flushToDisk: false);
    }

    /// <summary>Reads a trial log for <c>--resume</c>: drops an unterminated last line, checks the header, returns the trials.</summary>
    private List<Trial> ReadLog(string path, string header, string legacyHeader)
    {
        var trials = new List<Trial>();
        if (!File.Exists(path))
        {
            return trials;
        }

        byte[] bytes = File.ReadAllBytes(path);
        int end = Array.LastIndexOf(bytes, (byte)'\n') + 1;
        if (end < bytes.Length)
        {
            AtomicFile.WriteAllBytes(path, bytes.AsSpan(0, end));
        }

        string[] lines = Encoding.UTF8.GetString(bytes, 0, end).Split('\n', StringSplitOptions.None)[..^1];
        if (lines.Length == 0)
        {
            return trials;
        }

        if (lines[0] != header && lines[0] != legacyHeader)
        {
            throw BadInputException.At(path, 1, "run", "--resume: this log was written for another search (objective, seed, budget, space, base preset or tuning frames differ); delete it or drop --resume");
        }

        for (int i = 1; i < lines.Length; i++)
        {
            try
            {
                using JsonDocument doc = JsonDocument.Parse(lines[i]);
                JsonElement e = doc.RootElement;
                int index = e.GetProperty("index").GetInt32();
                if (index != trials.Count)
                {
                    throw BadInputException.At(path, i + 1, "index", string.Create(CultureInfo.InvariantCulture, $"expected trial {trials.Count}, found {index}"));
                }

                JsonElement values = e.GetProperty("values");
                double[] v = [.. space.Parameters.Select(p => values.GetProperty(p.Key).GetDouble())];
                trials.Add(new Trial(index, e.GetProperty("phase").GetString() ?? string.Empty, v, e.GetProperty("objective").GetDouble()));
            }
            catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
            {
                throw BadInputException.At(path, i + 1, null, "not a trial record: " + ex.Message);
            }
        }

        return trials;
    }
}
