using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

/// <summary>Everything the HTML report shows. Nothing in it is read from the clock or the machine by the writer.</summary>
public sealed record ReportInput
{
    /// <summary>The parsed score results, or null for a page of audit findings only.</summary>
    public ScoreDocument? Score { get; init; }

    /// <summary>Where the score results came from, as the user named it (null without score results).</summary>
    public string? ScoreSource { get; init; }

    /// <summary>The summarised audit findings, or null when none were given.</summary>
    public Audit.AuditSummary? Audit { get; init; }

    /// <summary>Per-stage cost from <c>bench --json</c>, or null when not given.</summary>
    public Bench.BenchSummary? Bench { get; init; }

    /// <summary>The "generated at" time printed in the page (injected, so the page is reproducible).</summary>
    public required DateTimeOffset GeneratedAt { get; init; }

    /// <summary>Versions of the tool and the libraries that made the page, in display order.</summary>
    public IReadOnlyList<KeyValuePair<string, string>> Versions { get; init; } = [];

    /// <summary>Settings of the report itself (inputs, caps), in display order.</summary>
    public IReadOnlyList<KeyValuePair<string, string>> ReportSettings { get; init; } = [];

    /// <summary>The worst-frame gallery, or null when it was not requested.</summary>
    public Gallery? Gallery { get; init; }
}
