using System.Diagnostics;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// Runs headless Chromium (Debian package <c>chromium</c>, installed by scripts/setup.sh) on a local file with the
/// flags of the stack guide, a fresh profile folder and a time limit; a process that overruns is killed with its
/// children.
/// </summary>
internal static class HeadlessChromium
{
    private static readonly TimeSpan Limit = TimeSpan.FromSeconds(90);

    public static string Executable =>
        Environment.GetEnvironmentVariable("LANEBASELINE_CHROMIUM") is { Length: > 0 } e ? e : "/usr/bin/chromium";

    /// <summary>Runs Chromium with extra arguments on a file URL; returns exit code and stdout.</summary>
    public static (int Exit, string Stdout, string Stderr) Run(string htmlPath, params string[] extra)
    {
        if (!File.Exists(Executable))
        {
            throw new InvalidOperationException($"{Executable} not found: run scripts/setup.sh (installs the Debian package chromium)");
        }

        string profile = Path.Combine(Path.GetTempPath(), "lanebaseline-chromium-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(profile);
        try
        {
            var psi = new ProcessStartInfo(Executable)
            {
                RedirectStandardOutput = true,
                RedirectStandardError = true,
                UseShellExecute = false,
            };
            foreach (string a in new[]
            {
                "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
                "--disable-sync", "--no-first-run", "--disable-quic", "--user-data-dir=" + profile,
            }.Concat(extra))
            {
                psi.ArgumentList.Add(a);
            }

            psi.ArgumentList.Add(new Uri(Path.GetFullPath(htmlPath)).AbsoluteUri);
            using var process = Process.Start(psi) ?? throw new InvalidOperationException("chromium did not start");
            Task<string> stdout = process.StandardOutput.ReadToEndAsync();
            Task<string> stderr = process.StandardError.ReadToEndAsync();
            if (!process.WaitForExit(Limit))
            {
                process.Kill(entireProcessTree: true);
                process.WaitForExit();
                throw new TimeoutException($"chromium did not finish within {Limit.TotalSeconds} s and was killed");
            }

            process.WaitForExit();
            return (process.ExitCode, stdout.Result, stderr.Result);
        }
        finally
        {
            try
            {
                Directory.Delete(profile, recursive: true);
            }
            catch (IOException)
            {
            }
            catch (UnauthorizedAccessException)
            {
            }
        }
    }
}
