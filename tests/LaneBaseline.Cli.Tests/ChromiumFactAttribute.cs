using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// A test that needs headless Chromium. Where the browser is absent (a fresh CI machine installs none) the test is
/// reported as skipped with the reason, never silently passed; the test itself installs nothing.
/// </summary>
[AttributeUsage(AttributeTargets.Method, AllowMultiple = false)]
public sealed class ChromiumFactAttribute : FactAttribute
{
    public ChromiumFactAttribute()
    {
        if (!File.Exists(HeadlessChromium.Executable))
        {
            Skip = $"{HeadlessChromium.Executable} is absent: the browser check of the report page needs headless Chromium (scripts/setup.sh installs it; CI has none)";
        }
    }
}
