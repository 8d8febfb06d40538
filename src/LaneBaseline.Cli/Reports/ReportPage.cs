using System.Globalization;
using System.Reflection;
using System.Runtime.InteropServices;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Reporting;
using LaneBaseline.Reporting.Audit;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Cli.Reports;

/// <summary>Builds the whole page in memory (every input checked first) and then writes it atomically.</summary>
internal static class ReportPage
{
    public static void Write(
        string outputPath,
        ScoreDocument? score,
        string? scoreSource,
        AuditSummary? audit,
        GalleryRequest? gallery,
        DateTimeOffset generatedAt,
        CancellationToken cancellationToken,
        LaneBaseline.Reporting.Bench.BenchSummary? bench = null)
    {
        var reportSettings = new List<KeyValuePair<string, string>>();
        if (scoreSource is not null)
        {
            reportSettings.Add(new("report.score", scoreSource));
        }

        if (audit is not null)
        {
            reportSettings.Add(new("report.audit", audit.Source));
            reportSettings.Add(new("report.audit_top", audit.Top.Count.ToString(CultureInfo.InvariantCulture) + " first findings listed (cap " + AuditFindingsReader.DefaultTop.ToString(CultureInfo.InvariantCulture) + ")"));
        }

        if (bench is not null)
        {
            reportSettings.Add(new("report.bench", bench.Source));
        }

        Gallery? built = null;
        if (gallery is not null && score is not null)
        {
            ScoreSettings settings = SettingsOf(score);
            // Tags where the first system does worst come first: the per-tag gallery is for finding failing conditions.
            SystemResult first = score.Systems.FirstOrDefault(s => s.Name == gallery.Systems[0].Name) ?? score.Systems[0];
            IReadOnlyList<string>? tagOrder = first.ByTag.Count == 0 ? null
                : [.. first.ByTag.OrderBy(kv => kv.Value.At("0.50")?.F1 ?? double.PositiveInfinity).ThenBy(kv => kv.Key, StringComparer.Ordinal).Select(kv => kv.Key)];
            // Full-size overlays of the regression gallery go beside the page: PAGE.frames/NNN_<frame>.png.
            string full = Path.GetFullPath(outputPath);
            string stem = Path.GetFileNameWithoutExtension(full);
            var regressions = new WorstFrameGallery.RegressionOptions(
                gallery.Settings ?? settings, gallery.Focus, Path.Combine(Path.GetDirectoryName(full) ?? ".", stem + ".frames"), Uri.EscapeDataString(stem + ".frames") + "/");
            built = gallery.Candidates is { } captured
                ? WorstFrameGallery.Build(gallery.FramesDir, gallery.TruthPath, gallery.Systems, captured, tagOrder, cancellationToken, regressions)
                : WorstFrameGallery.Build(gallery.FramesDir, gallery.TruthPath, gallery.Systems, settings, gallery.Threads, cancellationToken, tagOrder, regressions);
            reportSettings.Add(new("report.frames", gallery.FramesDir));
            reportSettings.Add(new("report.truth", gallery.TruthPath));
            foreach (ScoredSystem s in gallery.Systems)
            {
                reportSettings.Add(new("report.pred." + s.Name, s.Path));
            }

            reportSettings.Add(new("report.gallery", built.Selection));
            if (built.ByTag is { } byTag)
            {
                reportSettings.Add(new("report.gallery_by_tag", byTag.Selection));
            }
        }

        var versions = new List<KeyValuePair<string, string>>
        {
            new("lanebaseline", ToolVersion),
            new(".NET runtime", RuntimeInformation.FrameworkDescription),
        };
        if (gallery is not null)
        {
            versions.Add(new("OpenCV (thumbnails)", OpenCvSharp.Cv2.GetVersionString() ?? "unknown"));
        }

        string html = HtmlReportWriter.Render(new ReportInput
        {
            Score = score,
            ScoreSource = scoreSource,
            Audit = audit,
            GeneratedAt = generatedAt,
            Versions = versions,
            ReportSettings = reportSettings,
            Gallery = built,
            Bench = bench,
        });

        using var file = new AtomicFile(outputPath);
        file.Writer.Write(html);
        file.Commit();
    }

    /// <summary>The tool's informational version.</summary>
    public static string ToolVersion =>
        typeof(ReportPage).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "unknown";

    /// <summary>Parses an injected "generated at" time (ISO 8601); null means now.</summary>
    public static DateTimeOffset ParseGeneratedAt(string? text)
    {
        if (text is null)
        {
            return DateTimeOffset.UtcNow;
        }

        return DateTimeOffset.TryParse(text, CultureInfo.InvariantCulture, DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal, out DateTimeOffset t)
            ? t
            : throw new UsageException($"--generated-at '{text}' is not an ISO 8601 time such as 2026-01-31T12:00:00Z");
    }

    /// <summary>The scoring settings recorded in the score file (lane width and tolerance), so the gallery ranks frames as the score did.</summary>
    private static ScoreSettings SettingsOf(ScoreDocument score)
    {
        int? width = int.TryParse(score.Setting("lane_width_px"), NumberStyles.Integer, CultureInfo.InvariantCulture, out int w) && w > 0 ? w : null;
        double? tol = double.TryParse(score.Setting("tolerance_px"), NumberStyles.Float, CultureInfo.InvariantCulture, out double t) && t > 0 ? t : null;
        return new ScoreSettings { LaneWidthPx = width, TolerancePx = tol };
    }
}
