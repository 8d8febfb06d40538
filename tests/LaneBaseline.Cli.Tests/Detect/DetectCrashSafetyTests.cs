using System.Diagnostics;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Random;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests.Detect;

// Issue requirement (crash safety): a detect process killed with SIGKILL at random points and then resumed yields
// the identical lane file; Ctrl-C (SIGINT) stops with exit 130, leaves the old output as it was and removes its
// temporary (issue 17, items 6 and 14). A killed run's records are in OUT.tmp, which --resume continues.
public sealed class DetectCrashSafetyTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void Detect_KilledAtRandomPoints_ThenResumed_EqualsOneFullRun()
    {
        string frames = RenderFrames();
        string full = dir.File("full.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("detect", frames, "-o", full, "--threads", "1").Exit);
        byte[] expected = File.ReadAllBytes(full);

        var rng = new SplitMix64(20261202);
        for (int attempt = 0; attempt < 3; attempt++)
        {
            string part = dir.File($"part{attempt}.lanes.jsonl");
            using (Process p = Start(frames, part))
            {
                Thread.Sleep(300 + rng.NextInt(1500));
                if (!p.HasExited)
                {
                    p.Kill(entireProcessTree: true); // SIGKILL
                }

                Assert.True(p.WaitForExit(30_000));
                if (p.ExitCode == 0)
                {
                    // On a fast machine the run can finish before the kill: then it is complete and renamed into place.
                    Assert.Equal(expected, File.ReadAllBytes(part));
                }
                else
                {
                    // Renamed into place only when complete: the kill can land between the rename and the exit (a busy
                    // machine), and then the file must be the whole output; otherwise it must not exist.
                    if (File.Exists(part))
                    {
                        Assert.Equal(expected, File.ReadAllBytes(part));
                    }

                    if (File.Exists(part + ".tmp"))
                    {
                        AssertValidPrefix(part + ".tmp", expected);
                    }
                }
            }

            Assert.Equal(0, CliRunner.Run("detect", frames, "-o", part, "--threads", "1", "--resume").Exit);
            Assert.Equal(expected, File.ReadAllBytes(part));
            Assert.False(File.Exists(part + ".tmp"));
        }
    }

    [Fact]
    public void Detect_Interrupted_Exits130_KeepsTheOldOutput_RemovesTheTemporary()
    {
        string frames = RenderFrames();
        string full = dir.File("full.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("detect", frames, "-o", full, "--threads", "1").Exit);
        string part = dir.File("part.lanes.jsonl");
        byte[] old = "{\"frame\":\"old.png\",\"lanes\":[]}\n"u8.ToArray();
        File.WriteAllBytes(part, old);
        string temp = part + ".tmp";
        using Process p = Start(frames, part);
        // Wait until the run is under way (first record written to the temporary), then send SIGINT.
        var clock = Stopwatch.StartNew();
        while (!p.HasExited && (!File.Exists(temp) || new FileInfo(temp).Length == 0) && clock.ElapsedMilliseconds < 60_000)
        {
            Thread.Sleep(20);
        }

        if (p.HasExited)
        {
            return; // finished before it could be interrupted on this machine; nothing to check
        }

        using (Process kill = Process.Start("kill", ["-INT", p.Id.ToString(System.Globalization.CultureInfo.InvariantCulture)]))
        {
            kill.WaitForExit();
        }

        Assert.True(p.WaitForExit(30_000));
        if (p.ExitCode == 0)
        {
            return; // it finished between the check and the signal
        }

        Assert.Equal(130, p.ExitCode);
        Assert.Equal(old, File.ReadAllBytes(part));
        Assert.False(File.Exists(temp));
        Assert.False(File.Exists(dir.File("part.config.yaml")));
    }

    private static void AssertValidPrefix(string path, byte[] expected)
    {
        byte[] got = File.ReadAllBytes(path);
        int end = Array.LastIndexOf(got, (byte)'\n') + 1;
        Assert.True(end <= expected.Length);
        Assert.Equal(expected.AsSpan(0, end).ToArray(), got.AsSpan(0, end).ToArray());
        using var reader = LaneFileReader.FromStream(new MemoryStream(got, 0, end), path, sizeRequired: false);
        Assert.Equal(got[..end].Count(b => b == (byte)'\n'), reader.ReadAll().Count());
    }

    private static Process Start(string frames, string output)
    {
        var psi = new ProcessStartInfo("dotnet")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (string a in new[] { Path.Combine(AppContext.BaseDirectory, "lanebaseline.dll"), "detect", frames, "-o", output, "--threads", "1" })
        {
            psi.ArgumentList.Add(a);
        }

        Process p = Process.Start(psi)!;
        p.OutputDataReceived += (_, _) => { };
        p.ErrorDataReceived += (_, _) => { };
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        return p;
    }

    private string RenderFrames()
    {
        string frames = dir.File("frames");
        if (!Directory.Exists(frames))
        {
            Assert.Equal(0, CliRunner.Run("render", "--out", frames, "--seed", "5", "--count", "6", "--sequence-length", "5", "--size", "640x360", "--threads", "2").Exit);
        }

        return frames;
    }
}
