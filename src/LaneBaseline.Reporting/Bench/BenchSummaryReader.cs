using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core;

namespace LaneBaseline.Reporting.Bench;

#pragma warning disable IDISP004 // JsonElement array enumerators own no resources
/// <summary>Reads the parts of a <c>bench --json</c> file (schema version 1, docs/bench.md) that the report shows.</summary>
public static class BenchSummaryReader
{
    /// <summary>Reads and checks a bench JSON file; errors name the file and the key.</summary>
    public static BenchSummary Read(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, Directory.Exists(path) ? "is a directory, expected bench --json output" : "file not found");
        }

        string key = "json";
        try
        {
            using JsonDocument doc = JsonDocument.Parse(File.ReadAllBytes(path));
            JsonElement root = doc.RootElement;
            key = "schema_version";
            if (root.GetProperty("schema_version").GetInt32() != 2)
            {
                throw BadInputException.At(path, 0, key, "only schema version 2 is understood (bench JSON with snake_case keys; rerun bench)");
            }

            key = "machine";
            JsonElement m = root.GetProperty("machine");
            JsonElement cv = m.GetProperty("opencv");
            string machine = string.Create(
                CultureInfo.InvariantCulture,
                $"{m.GetProperty("cpu_model").GetString()} · {m.GetProperty("logical_cores").GetInt32()} cores · {m.GetProperty("os").GetString()} · {m.GetProperty("dotnet").GetString()} · OpenCV {cv.GetProperty("version").GetString()}");
            var runs = new List<BenchRun>();
            int i = 0;
            foreach (JsonElement r in root.GetProperty("runs").EnumerateArray())
            {
                key = "runs[" + i.ToString(CultureInfo.InvariantCulture) + "]";
                JsonElement pipe = r.GetProperty("pipeline");
                var stages = pipe.GetProperty("stages").EnumerateArray()
                    .Select(s => (s.GetProperty("name").GetString()!, Finite(s.GetProperty("median_ms")), Finite(s.GetProperty("p95_ms"))))
                    .ToList();
                int workers = r.GetProperty("workers").GetInt32();
                runs.Add(new BenchRun(
                    string.Create(CultureInfo.InvariantCulture, $"{r.GetProperty("width").GetInt32()}x{r.GetProperty("height").GetInt32()}, {workers} worker{(workers == 1 ? string.Empty : "s")}"),
                    stages,
                    Finite(pipe.GetProperty("frame_ms").GetProperty("median")),
                    Finite(pipe.GetProperty("frame_ms").GetProperty("p95")),
                    Finite(r.GetProperty("floor").GetProperty("frame_ms").GetProperty("median")),
                    Finite(r.GetProperty("ratio").GetProperty("median_of_pairs")),
                    Finite(r.GetProperty("frames_per_second")),
                    Finite(r.GetProperty("allocated_bytes_per_frame"))));
                i++;
            }

            if (runs.Count == 0)
            {
                throw BadInputException.At(path, 0, "runs", "no measured runs");
            }

            return new BenchSummary(path, machine, runs);
        }
        catch (JsonException ex)
        {
            throw BadInputException.At(path, (ex.LineNumber ?? -1) + 1, key, "not valid bench JSON: " + ex.Message.Split(" LineNumber:", 2)[0]);
        }
        catch (Exception ex) when (ex is KeyNotFoundException or InvalidOperationException or FormatException)
        {
            throw BadInputException.At(path, 0, key, "missing or mistyped value (expected bench --json output, schema 1): " + ex.Message);
        }
    }

    private static double Finite(JsonElement e)
    {
        double v = e.GetDouble();
        return double.IsFinite(v) ? v : throw new FormatException("non-finite number");
    }
}
#pragma warning restore IDISP004
