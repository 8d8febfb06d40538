namespace LaneBaseline.Cli;

/// <summary>Process exit codes of the command-line contract.</summary>
internal static class ExitCodes
{
    public const int Success = 0;
    public const int InternalError = 1;
    public const int UsageError = 2;
    public const int InputError = 3;
    public const int GateFailed = 4;
    public const int Cancelled = 130;
}
