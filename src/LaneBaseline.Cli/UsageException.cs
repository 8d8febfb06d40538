namespace LaneBaseline.Cli;

/// <summary>A usage error found after parsing (conflicting or malformed option values): exit code 2.</summary>
internal sealed class UsageException : Exception
{
    public UsageException(string message)
        : base(message)
    {
    }

    public UsageException()
    {
    }

    public UsageException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
