namespace LaneBaseline.Cli;

/// <summary>
/// What one command run shares across its parts: standard input read as <c>-</c> is copied once to a private
/// temporary file (scoring and auditing read their inputs twice), which the run deletes at its end; messages name it
/// as <c>-</c>.
/// </summary>
internal sealed class RunContext : IDisposable
{
    private static readonly AsyncLocal<RunContext?> CurrentRun = new();
    private readonly RunContext? previous;
    private string? tempDir;
    private string? stdinCopy;

    private RunContext(RunContext? previous) => this.previous = previous;

    /// <summary>Starts a run (nested runs restore the outer one on dispose).</summary>
    public static RunContext Begin() => CurrentRun.Value = new RunContext(CurrentRun.Value);

    /// <summary>Returns <paramref name="path"/>, or for <c>-</c> a file holding all of standard input.</summary>
    public static string Input(string path) =>
        StandardStreams.IsDash(path) ? (CurrentRun.Value ?? throw new InvalidOperationException("no run")).CopyStdin() : path;

    /// <summary>Whether <paramref name="path"/> is the copy of standard input.</summary>
    public static bool IsStdinCopy(string path) => CurrentRun.Value?.stdinCopy is string copy && path == copy;

    /// <summary><paramref name="text"/> with the current run's copy of standard input named <c>-</c>.</summary>
    public static string Display(string text) => CurrentRun.Value is { } run ? run.Clean(text) : text;

    /// <summary>Whether the current run read standard input.</summary>
    public static bool ReadStdin => CurrentRun.Value?.stdinCopy is not null;

    /// <summary><paramref name="message"/> with the temporary copy of standard input named <c>-</c>.</summary>
    public string Clean(string message) => stdinCopy is null ? message : message.Replace(stdinCopy, StandardStreams.Dash, StringComparison.Ordinal);

    public void Dispose()
    {
        CurrentRun.Value = previous;
        if (tempDir is not null && Directory.Exists(tempDir))
        {
            Directory.Delete(tempDir, recursive: true);
        }
    }

    private string CopyStdin()
    {
        if (stdinCopy is not null)
        {
            return stdinCopy;
        }

        tempDir = Directory.CreateTempSubdirectory("lanebaseline-stdin-").FullName;
        string spool = Path.Combine(tempDir, "stdin");
        using (var file = new FileStream(spool, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16))
        {
            StandardStreams.Input.CopyTo(file);
        }

        // The readers choose the format by name: an OpenLABEL document says so near its start, a lane file does not.
        byte[] head = new byte[512];
        int n;
        using (var read = File.OpenRead(spool))
        {
            n = read.ReadAtLeast(head, head.Length, throwOnEndOfStream: false);
        }

        bool openLabel = head.AsSpan(0, n).IndexOf("\"openlabel\""u8) >= 0;
        stdinCopy = Path.Combine(tempDir, openLabel ? "stdin.json" : "stdin.lanes.jsonl");
        File.Move(spool, stdinCopy);
        return stdinCopy;
    }
}
