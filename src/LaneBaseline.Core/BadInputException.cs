namespace LaneBaseline.Core;

/// <summary>
/// Bad input from a user-supplied file or argument. The message names the file, the line (or frame) and the
/// reason; the command-line tool reports it and exits with code 3, never with a stack trace.
/// </summary>
public class BadInputException : Exception
{
    /// <summary>Creates the exception with a complete, user-facing message.</summary>
    public BadInputException(string message)
        : base(message)
    {
    }

    /// <summary>Creates the exception with a complete, user-facing message and its cause.</summary>
    public BadInputException(string message, Exception innerException)
        : base(message, innerException)
    {
    }

    /// <summary>Creates the exception with no message (for serializers).</summary>
    public BadInputException()
    {
    }

    /// <summary>
    /// Each problem when the exception reports several (a preset with several errors lists all of them): printed one
    /// per line; the message joins them with line breaks. A single problem has one entry, the message.
    /// </summary>
    public IReadOnlyList<string> Problems => problems ?? [Message];

    private IReadOnlyList<string>? problems;

    /// <summary>One exception reporting every one of <paramref name="messages"/> (each a complete <c>FILE:LINE: key: problem</c>).</summary>
    public static BadInputException Several(IEnumerable<string> messages)
    {
        string[] all = [.. messages];
        return new BadInputException(string.Join('\n', all)) { problems = all };
    }

    /// <summary>Names a list of inputs in a message: all of up to three, else the first three and how many more.</summary>
    public static string Files(IReadOnlyList<string> paths)
    {
        ArgumentNullException.ThrowIfNull(paths);
        string shown = string.Join(", ", paths.Take(3));
        return paths.Count <= 3 ? "given: " + shown : string.Create(System.Globalization.CultureInfo.InvariantCulture, $"given: {shown} and {paths.Count - 3} more");
    }

    /// <summary>Formats the project's standard location prefix: <c>FILE:LINE: key: problem</c>.</summary>
    /// <param name="file">File as the user named it.</param>
    /// <param name="line">One-based line number, or 0 when the problem concerns the whole file.</param>
    /// <param name="key">Key path such as <c>lanes[2].points[0]</c>, or null.</param>
    /// <param name="problem">The reason, in plain words.</param>
    public static BadInputException At(string file, long line, string? key, string problem)
    {
        string where = line > 0 ? $"{file}:{line.ToString(System.Globalization.CultureInfo.InvariantCulture)}" : file;
        return new BadInputException(key is null ? $"{where}: {problem}" : $"{where}: {key}: {problem}");
    }
}
