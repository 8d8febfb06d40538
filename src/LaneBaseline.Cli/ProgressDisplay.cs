using System.Diagnostics;
using System.Globalization;
using Spectre.Console;
using Spectre.Console.Rendering;

namespace LaneBaseline.Cli;

/// <summary>
/// Progress of a long command on stderr. On a terminal, work that runs longer than 2 s gets a live bar with rate and
/// ETA (Spectre.Console); without a terminal (CI, pipes, tests) the plain line <c>LABEL: done/total UNIT</c> is printed
/// at most every 2 s. Results never go through here, so stdout stays clean either way.
/// </summary>
internal sealed class ProgressDisplay : IDisposable
{
    private static readonly TimeSpan Period = TimeSpan.FromSeconds(2);
    private readonly string label;
    private readonly string unit;
    private readonly TextWriter stderr;
    private readonly bool live;
    private readonly Stopwatch clock = Stopwatch.StartNew();
    private readonly object gate = new();
    private TimeSpan lastLine;
    private long done;
    private long total;
    private Task? bar;
    private volatile bool finished;

    /// <summary>Progress of <paramref name="label"/> counted in <paramref name="unit"/> (e.g. "frames").</summary>
    public ProgressDisplay(string label, string unit, TextWriter stderr)
    {
        this.label = label;
        this.unit = unit;
        this.stderr = stderr;
        live = ReferenceEquals(stderr, Console.Error) && !Console.IsErrorRedirected && AnsiConsole.Profile.Capabilities.Interactive
            && Environment.GetEnvironmentVariable("CI") is null;
    }

    /// <summary>Reports <paramref name="count"/> units done of <paramref name="of"/> (negative: unknown).</summary>
    public void Report(long count, long of = -1)
    {
        Interlocked.Exchange(ref done, count);
        Interlocked.Exchange(ref total, of);
        TimeSpan now = clock.Elapsed;
        if (live)
        {
            if (bar is null && now >= Period)
            {
                lock (gate)
                {
                    bar ??= Task.Run(RunBar);
                }
            }

            return;
        }

        if (now - lastLine >= Period && (of < 0 || count < of))
        {
            lastLine = now;
            string ofText = of >= 0 ? "/" + of.ToString(CultureInfo.InvariantCulture) : string.Empty;
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{label}: {count}{ofText} {unit} ({count / Math.Max(now.TotalSeconds, 1e-9):0.0} {unit}/s)"));
        }
    }

    /// <summary>Stops the bar (if one is shown) before the command prints its closing lines.</summary>
    public void Finish()
    {
        finished = true;
        bar?.Wait();
    }

    /// <inheritdoc/>
    public void Dispose() => Finish();

    private void RunBar()
    {
        IAnsiConsole console = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(Console.Error) });
        console.Progress()
            .AutoClear(true)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RateColumn(unit), new RemainingTimeColumn(), new SpinnerColumn())
            .Start(context =>
            {
                long of = Interlocked.Read(ref total);
                ProgressTask task = context.AddTask(label, maxValue: of > 0 ? of : 1);
                task.IsIndeterminate = of <= 0;
                while (!finished)
                {
                    of = Interlocked.Read(ref total);
                    if (of > 0)
                    {
                        task.MaxValue = of;
                        task.IsIndeterminate = false;
                    }

                    task.Value = Interlocked.Read(ref done);
                    context.Refresh();
                    Thread.Sleep(100);
                }

                task.Value = task.MaxValue;
            });
    }

    /// <summary>Units per second of the task.</summary>
    private sealed class RateColumn(string unit) : ProgressColumn
    {
        public override IRenderable Render(RenderOptions options, ProgressTask task, TimeSpan deltaTime) =>
            new Text(string.Create(CultureInfo.InvariantCulture, $"{task.Speed ?? 0:0.0} {unit}/s"));
    }
}
