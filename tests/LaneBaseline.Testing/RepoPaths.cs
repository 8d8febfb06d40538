namespace LaneBaseline.Testing;

/// <summary>Locates folders of the repository from a test's working directory.</summary>
public static class RepoPaths
{
    /// <summary>The repository root (the folder holding LaneBaseline.sln).</summary>
    public static string Root { get; } = FindRoot();

    /// <summary>A path under the repository root.</summary>
    public static string Combine(params string[] parts) => Path.Combine([Root, .. parts]);

    private static string FindRoot()
    {
        for (DirectoryInfo? d = new(AppContext.BaseDirectory); d is not null; d = d.Parent)
        {
            if (File.Exists(Path.Combine(d.FullName, "LaneBaseline.sln")))
            {
                return d.FullName;
            }
        }

        throw new InvalidOperationException("LaneBaseline.sln not found above " + AppContext.BaseDirectory);
    }
}
