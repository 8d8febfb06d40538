using BenchmarkDotNet.Running;

namespace LaneBaseline.Benchmarks;

/// <summary>Micro-benchmarks (BenchmarkDotNet); not run by dotnet test. Run: dotnet run -c Release --project tests/LaneBaseline.Benchmarks.</summary>
internal static class Program
{
    private static void Main(string[] args)
    {
        if (args is ["soak-data", string n, string d, string size])
        {
            string[] wh = size.Split('x');
            SoakData.Write(int.Parse(n, System.Globalization.CultureInfo.InvariantCulture), d, int.Parse(wh[0], System.Globalization.CultureInfo.InvariantCulture), int.Parse(wh[1], System.Globalization.CultureInfo.InvariantCulture)); // data for score timings (docs/scaling.md)
            return;
        }

        if (args is ["soak-data", string frames, string dir])
        {
            SoakData.Write(int.Parse(frames, System.Globalization.CultureInfo.InvariantCulture), dir); // data for scripts/soak.sh
            return;
        }

        BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
    }
}
