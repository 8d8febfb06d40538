namespace LaneBaseline.Core.IO;

/// <summary>
/// The standard streams that the path <c>-</c> stands for: <see cref="AtomicFile"/> writes <c>-</c> to
/// <see cref="Output"/>, and readers of lane inputs read <c>-</c> from <see cref="Input"/>. The command line sets them
/// per run (<see cref="Use"/>, flowing into the run's worker tasks); unset, they are the process's own streams.
/// </summary>
public static class StandardStreams
{
    /// <summary>The path that means standard output (for outputs) or standard input (for inputs).</summary>
    public const string Dash = "-";

    private static readonly AsyncLocal<Stream?> OutputOverride = new();
    private static readonly AsyncLocal<Stream?> InputOverride = new();

    /// <summary>Whether <paramref name="path"/> is <c>-</c>.</summary>
    public static bool IsDash(string? path) => path == Dash;

    /// <summary>The stream <c>-</c> writes to (not owned by the caller: flush it, never dispose it).</summary>
    public static Stream Output => OutputOverride.Value ?? ProcessOutput.Value;

    /// <summary>The stream <c>-</c> reads from (not owned by the caller).</summary>
    public static Stream Input => InputOverride.Value ?? ProcessInput.Value;

    private static Lazy<Stream> ProcessOutput { get; } = new(Console.OpenStandardOutput);

    private static Lazy<Stream> ProcessInput { get; } = new(Console.OpenStandardInput);

    /// <summary>Uses <paramref name="output"/> and <paramref name="input"/> for <c>-</c> until the returned scope is disposed.</summary>
    public static IDisposable Use(Stream? output, Stream? input)
    {
        Stream? oldOut = OutputOverride.Value, oldIn = InputOverride.Value;
        OutputOverride.Value = output;
        InputOverride.Value = input;
        return new Scope(() =>
        {
            OutputOverride.Value = oldOut;
            InputOverride.Value = oldIn;
        });
    }

    private sealed class Scope(Action restore) : IDisposable
    {
        public void Dispose() => restore();
    }
}
