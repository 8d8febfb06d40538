using System.Globalization;
using System.Runtime.InteropServices;
using OpenCvSharp;

namespace LaneBaseline.Cli.Bench;

/// <summary>What the figures were measured on, so numbers from different targets can be compared.</summary>
internal sealed record MachineInfo
{
    public required string CpuModel { get; init; }

    public required int LogicalCores { get; init; }

    public required string Os { get; init; }

    public required string Architecture { get; init; }

    public required string DotNet { get; init; }

    public required string OpenCvVersion { get; init; }

    /// <summary>SIMD instruction sets OpenCV was compiled for (its "Baseline" line), or "none".</summary>
    public required string OpenCvSimdBaseline { get; init; }

    /// <summary>Instruction sets with run-time dispatched kernels (its "Dispatched code" line), or "none".</summary>
    public required string OpenCvSimdDispatched { get; init; }

    /// <summary>SIMD instruction sets this CPU offers (as .NET sees them), which decide what OpenCV's dispatched kernels use.</summary>
    public required string HostSimd { get; init; }

    /// <summary>Whether OpenCV's optimised code paths (SIMD, IPP) are switched on (cv::useOptimized).</summary>
    public required bool OpenCvOptimized { get; init; }

    /// <summary>Whether OpenCV was built with Intel IPP, and which (its "Intel IPP" line), or "NO".</summary>
    public required string OpenCvIpp { get; init; }

    /// <summary>OpenCV's parallel framework (its "Parallel framework" line).</summary>
    public required string OpenCvParallel { get; init; }

    /// <summary>OpenCV's worker-thread count before the benchmark set it to one.</summary>
    public required int OpenCvDefaultThreads { get; init; }

    public static MachineInfo Collect()
    {
        string build = Cv2.GetBuildInformation();
        return new MachineInfo
        {
            CpuModel = ReadCpuModel(),
            LogicalCores = Environment.ProcessorCount,
            Os = RuntimeInformation.OSDescription.Trim(),
            Architecture = RuntimeInformation.ProcessArchitecture.ToString().ToLowerInvariant(),
            DotNet = RuntimeInformation.FrameworkDescription,
            OpenCvVersion = Cv2.GetVersionString() ?? "unknown",
            OpenCvSimdBaseline = BuildLine(build, "Baseline:") ?? "none",
            OpenCvSimdDispatched = BuildLine(build, "Dispatched code generation:") ?? "none",
            OpenCvIpp = BuildLine(build, "Intel IPP:") ?? "NO",
            OpenCvParallel = BuildLine(build, "Parallel framework:") ?? "unknown",
            OpenCvDefaultThreads = Cv2.GetNumThreads(),
            HostSimd = HostSimdSets(),
            OpenCvOptimized = Cv2.UseOptimized(),
        };
    }

    private static string HostSimdSets()
    {
        var sets = new List<string>();
        if (System.Runtime.Intrinsics.X86.Sse42.IsSupported)
        {
            sets.Add("SSE4.2");
        }

        if (System.Runtime.Intrinsics.X86.Avx.IsSupported)
        {
            sets.Add("AVX");
        }

        if (System.Runtime.Intrinsics.X86.Avx2.IsSupported)
        {
            sets.Add("AVX2");
        }

        if (System.Runtime.Intrinsics.X86.Avx512F.IsSupported)
        {
            sets.Add("AVX-512F");
        }

        if (System.Runtime.Intrinsics.Arm.AdvSimd.IsSupported)
        {
            sets.Add("NEON");
        }

        return sets.Count == 0 ? "none" : string.Join(' ', sets);
    }

    /// <summary>The value after <paramref name="label"/> on the first line of OpenCV's build information that starts with it.</summary>
    internal static string? BuildLine(string buildInformation, string label)
    {
        foreach (string raw in buildInformation.Split('\n'))
        {
            string line = raw.Trim();
            if (line.StartsWith(label, StringComparison.Ordinal))
            {
                string value = string.Join(' ', line[label.Length..].Split(' ', StringSplitOptions.RemoveEmptyEntries));
                return value.Length == 0 ? null : value;
            }
        }

        return null;
    }

    private static string ReadCpuModel()
    {
        const string path = "/proc/cpuinfo";
        if (!File.Exists(path))
        {
            return RuntimeInformation.ProcessArchitecture.ToString().ToLowerInvariant() + " (no /proc/cpuinfo)";
        }

        // x86 names the CPU in "model name"; many ARM kernels give only "Hardware", "Model" or "CPU part".
        string? fallback = null;
        foreach (string line in File.ReadLines(path))
        {
            int colon = line.IndexOf(':', StringComparison.Ordinal);
            if (colon < 0)
            {
                continue;
            }

            string key = line[..colon].Trim();
            string value = line[(colon + 1)..].Trim();
            if (key == "model name" && value.Length > 0)
            {
                return value;
            }

            if (fallback is null && key is "Hardware" or "Model" or "CPU part" && value.Length > 0)
            {
                fallback = key + " " + value;
            }
        }

        return fallback ?? "unknown";
    }

    /// <summary>Peak and current resident set size of this process in bytes (/proc/self/status VmHWM, VmRSS), or null off Linux.</summary>
    public static (long? PeakBytes, long? CurrentBytes) ReadRss()
    {
        const string path = "/proc/self/status";
        if (!File.Exists(path))
        {
            return (null, null);
        }

        long? peak = null, current = null;
        foreach (string line in File.ReadLines(path))
        {
            if (line.StartsWith("VmHWM:", StringComparison.Ordinal))
            {
                peak = ParseKb(line);
            }
            else if (line.StartsWith("VmRSS:", StringComparison.Ordinal))
            {
                current = ParseKb(line);
            }
        }

        return (peak, current);
    }

    private static long? ParseKb(string line)
    {
        string[] parts = line.Split(' ', '\t', StringSplitOptions.RemoveEmptyEntries);
        return parts.Length >= 2 && long.TryParse(parts[1], NumberStyles.None, CultureInfo.InvariantCulture, out long kb) ? kb * 1024 : null;
    }
}
