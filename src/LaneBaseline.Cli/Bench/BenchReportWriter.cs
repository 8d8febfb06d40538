using System.Globalization;
using System.Text.Json;

namespace LaneBaseline.Cli.Bench;

/// <summary>Writes a <see cref="BenchResult"/> as the stdout table and as the JSON document of docs/bench.md.</summary>
internal static class BenchReportWriter
{
    public const int SchemaVersion = 2; // 2: snake_case keys (1 had camelCase)

    public static void WriteTable(BenchResult result, TextWriter output)
    {
        ArgumentNullException.ThrowIfNull(result);
        ArgumentNullException.ThrowIfNull(output);
        MachineInfo m = result.Machine;
        var c = CultureInfo.InvariantCulture;
        string from = result.Source == "render"
            ? string.Create(c, $"rendered, seed {result.Seed}")
            : result.FramesPath ?? "frames";
        output.WriteLine(string.Create(c, $"bench: {result.FrameKeys.Count} frames ({from}, {result.SourceWidth}x{result.SourceHeight}), config {result.Config}, warm-up {result.Warmup} calls/worker, {result.Passes} measured passes"));
        output.WriteLine(string.Create(c, $"machine: {m.CpuModel}; {m.LogicalCores} logical cores; {m.Architecture}; {m.Os}; {m.DotNet}"));
        output.WriteLine(string.Create(c, $"OpenCV {m.OpenCvVersion}: SIMD baseline {m.OpenCvSimdBaseline}, dispatched {m.OpenCvSimdDispatched} (this CPU: {m.HostSimd}); IPP {m.OpenCvIpp}; optimised paths {(m.OpenCvOptimized ? "on" : "off")}; parallel {m.OpenCvParallel}, 1 thread per worker (default {m.OpenCvDefaultThreads})"));
        output.WriteLine(string.Create(c, $"decode (not in the figures below): median {result.Decode.Median:0.00} ms, p95 {result.Decode.P95:0.00} ms per frame at {result.SourceWidth}x{result.SourceHeight}"));
        foreach (BenchRun run in result.Runs)
        {
            output.WriteLine();
            output.WriteLine(string.Create(c, $"== {run.Width}x{run.Height}, {run.Workers} worker(s), {run.Pipeline.Count} measured frame calls =="));
            output.WriteLine("  step                         median ms    p95 ms");
            foreach (NamedTiming s in run.Stages)
            {
                output.WriteLine(Row("stage " + s.Name, s.Stats));
            }

            output.WriteLine(Row("pipeline, whole frame", run.Pipeline));
            foreach (NamedTiming p in run.FloorPrimitives)
            {
                output.WriteLine(Row("floor " + p.Name, p.Stats));
            }

            output.WriteLine(Row("floor, whole frame", run.Floor));
            output.WriteLine(string.Create(c, $"  pipeline/floor {run.RatioMedianOfPairs:0.00} (median of A/B pairs; {run.RatioOfMedians:0.00} as a ratio of medians)"));
            string rss = run.PeakRssBytes is long r ? string.Create(c, $"{r / (1024.0 * 1024.0):0.0} MiB") : "n/a";
            output.WriteLine(string.Create(c, $"  {run.FramesPerSecond:0.0} frames/s (pipeline only, {run.Workers} worker(s)); {run.AllocatedBytesPerFrame:0} managed bytes/frame (max {run.MaxAllocatedBytesPerFrame}); peak RSS {rss}"));
        }
    }

    private static string Row(string label, TimingStats s) =>
        string.Create(CultureInfo.InvariantCulture, $"  {label,-28} {s.Median,9:0.000} {s.P95,9:0.000}");

    public static void WriteJson(BenchResult result, Stream stream)
    {
        ArgumentNullException.ThrowIfNull(result);
        using var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true });
        w.WriteStartObject();
        w.WriteString("tool", "lanebaseline");
        w.WriteString("command", "bench");
        w.WriteNumber("schema_version", SchemaVersion);
        w.WriteString("created_utc", DateTime.UtcNow.ToString("yyyy-MM-ddTHH:mm:ssZ", CultureInfo.InvariantCulture));
        MachineInfo m = result.Machine;
        w.WriteStartObject("machine");
        w.WriteString("cpu_model", m.CpuModel);
        w.WriteNumber("logical_cores", m.LogicalCores);
        w.WriteString("architecture", m.Architecture);
        w.WriteString("os", m.Os);
        w.WriteString("dotnet", m.DotNet);
        w.WriteStartObject("opencv");
        w.WriteString("version", m.OpenCvVersion);
        w.WriteString("simd_baseline", m.OpenCvSimdBaseline);
        w.WriteString("simd_dispatched", m.OpenCvSimdDispatched);
        w.WriteString("host_simd", m.HostSimd);
        w.WriteString("ipp", m.OpenCvIpp);
        w.WriteBoolean("optimized", m.OpenCvOptimized);
        w.WriteString("parallel_framework", m.OpenCvParallel);
        w.WriteNumber("default_threads", m.OpenCvDefaultThreads);
        w.WriteNumber("threads_per_worker", 1);
        w.WriteEndObject();
        w.WriteEndObject();

        w.WriteStartObject("input");
        w.WriteString("source", result.Source);
        if (result.FramesPath is not null)
        {
            w.WriteString("path", result.FramesPath);
        }

        if (result.Seed is ulong seed)
        {
            w.WriteNumber("seed", seed);
        }

        w.WriteString("config", result.Config);
        w.WriteNumber("frame_count", result.FrameKeys.Count);
        w.WriteNumber("width", result.SourceWidth);
        w.WriteNumber("height", result.SourceHeight);
        w.WriteNumber("warmup_calls_per_worker", result.Warmup);
        w.WriteNumber("passes", result.Passes);
        w.WritePropertyName("decode_ms");
        WriteStats(w, result.Decode);
        w.WriteStartArray("frames");
        foreach (string k in result.FrameKeys)
        {
            w.WriteStringValue(k);
        }

        w.WriteEndArray();
        w.WriteEndObject();

        w.WriteStartArray("runs");
        foreach (BenchRun run in result.Runs)
        {
            w.WriteStartObject();
            w.WriteNumber("width", run.Width);
            w.WriteNumber("height", run.Height);
            w.WriteNumber("workers", run.Workers);
            w.WriteStartObject("pipeline");
            w.WritePropertyName("frame_ms");
            WriteStats(w, run.Pipeline);
            w.WriteStartArray("stages");
            foreach (NamedTiming s in run.Stages)
            {
                WriteNamed(w, s);
            }

            w.WriteEndArray();
            WriteKeys(w, run.PipelineFrameKeys);
            w.WriteEndObject();
            w.WriteStartObject("floor");
            w.WritePropertyName("frame_ms");
            WriteStats(w, run.Floor);
            w.WriteStartArray("primitives");
            foreach (NamedTiming p in run.FloorPrimitives)
            {
                WriteNamed(w, p);
            }

            w.WriteEndArray();
            WriteKeys(w, run.FloorFrameKeys);
            w.WriteEndObject();
            w.WriteStartObject("ratio");
            WriteNumber(w, "median_of_pairs", run.RatioMedianOfPairs);
            WriteNumber(w, "of_medians", run.RatioOfMedians);
            w.WriteEndObject();
            WriteNumber(w, "frames_per_second", run.FramesPerSecond);
            WriteNumber(w, "allocated_bytes_per_frame", run.AllocatedBytesPerFrame);
            w.WriteNumber("max_allocated_bytes_per_frame", run.MaxAllocatedBytesPerFrame);
            if (run.PeakRssBytes is long rss)
            {
                w.WriteNumber("peak_rss_bytes", rss);
            }
            else
            {
                w.WriteNull("peak_rss_bytes");
            }

            w.WriteEndObject();
        }

        w.WriteEndArray();
        w.WriteEndObject();
    }

    private static void WriteKeys(Utf8JsonWriter w, IReadOnlyList<string> keys)
    {
        w.WriteNumber("frame_calls", keys.Count);
        w.WriteStartArray("frame_keys");
        foreach (string k in keys)
        {
            w.WriteStringValue(k);
        }

        w.WriteEndArray();
    }

    private static void WriteNamed(Utf8JsonWriter w, NamedTiming t)
    {
        w.WriteStartObject();
        w.WriteString("name", t.Name);
        WriteNumber(w, "median_ms", t.Stats.Median);
        WriteNumber(w, "p95_ms", t.Stats.P95);
        WriteNumber(w, "mean_ms", t.Stats.Mean);
        w.WriteEndObject();
    }

    private static void WriteStats(Utf8JsonWriter w, TimingStats s)
    {
        w.WriteStartObject();
        w.WriteNumber("count", s.Count);
        WriteNumber(w, "median", s.Median);
        WriteNumber(w, "p95", s.P95);
        WriteNumber(w, "mean", s.Mean);
        WriteNumber(w, "min", s.Min);
        WriteNumber(w, "max", s.Max);
        w.WriteEndObject();
    }

    /// <summary>A number rounded to 6 significant decimals; a non-finite value (never expected) is written as null.</summary>
    private static void WriteNumber(Utf8JsonWriter w, string name, double value)
    {
        if (double.IsFinite(value))
        {
            w.WriteNumber(name, Math.Round(value, 6));
        }
        else
        {
            w.WriteNull(name);
        }
    }
}
