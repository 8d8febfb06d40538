using System.Globalization;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Core;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Reporting.Audit;
using LaneBaseline.Vision.Audit;
using LaneBaseline.Vision.Masks;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;
using LaneBaseline.Cli.Commands;

namespace LaneBaseline.Cli.Outputs;

/// <summary>
/// Every output of a finished audit (findings file, stdout summary, labelling list, overlays, HTML page, quality gate),
/// written the same way by <c>audit</c> and by <c>merge</c> of audit states, so their bytes agree.
/// </summary>
internal static class AuditOutputWriter
{
    /// <summary>
    /// Writes everything an audit gives from its result — findings, labelling list, overlays, page, summary — and
    /// applies the gate. <c>audit</c> and <c>merge</c> (of audit states) share it, so their outputs are the same bytes.
    /// </summary>
    internal static int Finish(
        TextWriter stdout,
        TextWriter stderr,
        AuditResult result,
        AuditOutputs outputs,
        AuditJob job,
        LaneSourceOpener opener,
        CancellationToken cancellationToken)
    {
        AuditSettings settings = job.Settings;
        bool groundRules = settings.Camera is not null, baseline = job.Baseline is not null;
        string outPath = outputs.OutPath;
        using var findingsFile = new AtomicFile(outPath);
        AuditJsonWriter.Write(findingsFile.Stream, result);

        string stem = outPath.EndsWith(".jsonl", StringComparison.OrdinalIgnoreCase) ? outPath[..^6] : outPath;
        if (outputs.Mine > 0)
        {
            using var mineFile = new AtomicFile(stem + ".mine.txt");
            foreach (AuditFrameScore f in result.Mine(outputs.Mine))
            {
                mineFile.Writer.Write(f.Frame + "\n");
            }

            mineFile.Commit();
        }

        findingsFile.Commit();
        var drawn = new List<(int Rank, string Frame, string Path, byte[] Jpeg, int Width, int Height)>();
        if (outputs.Overlays > 0)
        {
            WriteOverlays(stem + ".overlays", result, job.Pred, job.Baseline, outputs.FramesRoot, settings, opener, outputs.Overlays, drawn, cancellationToken);
        }

        if (outputs.Report is (string reportPath, DateTimeOffset at))
        {
            // Read back what was written: the page shows exactly the findings file, streamed like `report --audit`.
            string pageDir = Path.GetDirectoryName(Path.GetFullPath(reportPath))!;
            AuditSummary summary = AuditFindingsReader.Read(outPath) with
            {
                Thumbnails = [.. drawn.OrderBy(d => d.Rank).Select(d => new AuditThumbnail(d.Rank, d.Frame, Href(pageDir, d.Path), d.Jpeg, d.Width, d.Height))],
            };
            ReportPage.Write(reportPath, null, null, summary, null, at, cancellationToken);
            stderr.WriteLine("audit: wrote " + reportPath);
        }

        if (outputs.SummaryJson is string summaryPath)
        {
            using var summaryFile = new AtomicFile(summaryPath);
            WriteSummaryJson(summaryFile.Stream, result, outPath, groundRules, settings.Stills, baseline, settings.FramesPerSecond);
            summaryFile.Commit();
        }

        WriteSummary(stdout, result, outPath, groundRules, settings.Stills);
        if (outputs.Gate is AuditSeverity g && result.Findings.Any(f => f.Severity >= g))
        {
            stderr.WriteLine("quality gate failed: findings of severity " + AuditJsonWriter.SeverityName(g) + " or worse (--fail-on)");
            return ExitCodes.GateFailed;
        }

        return ExitCodes.Success;
    }

    /// <summary>Whether a rule ran in this audit (temporal rules are off for stills, ground rules need a camera, the baseline rule a baseline).</summary>
    private static bool Ran(IAuditRule rule, bool groundRules, bool stills, bool baseline) => rule.Family switch
    {
        AuditRuleFamily.Temporal => !stills,
        AuditRuleFamily.Ground => groundRules,
        AuditRuleFamily.Baseline => baseline,
        _ => true,
    };

    /// <summary>The ids of a family's rules as a range, e.g. <c>LBA-G01..G03</c>.</summary>
    private static string IdRange(AuditRuleFamily family)
    {
        IAuditRule[] rules = [.. AuditRuleCatalogue.Rules.Where(r => r.Family == family)];
        return rules[0].Info.Id + ".." + rules[^1].Info.Id[4..];
    }

    /// <summary>Version of the summary JSON's layout (docs/schema/audit-summary.schema.json).</summary>
    internal const int SummarySchemaVersion = 1;

    private static void WriteSummaryJson(Stream stream, AuditResult result, string outPath, bool groundRules, bool stills, bool baseline, double fps)
    {
        using var w = new System.Text.Json.Utf8JsonWriter(stream, new System.Text.Json.JsonWriterOptions { Indented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
        w.WriteStartObject();
        w.WriteString("tool", "lanebaseline");
        w.WriteNumber("schema_version", SummarySchemaVersion);
        w.WriteString("findings_file", outPath);
        w.WriteNumber("frames", result.Frames);
        w.WriteNumber("flagged_frames", result.Findings.Select(f => f.Ordinal).Distinct().LongCount());
        w.WriteNumber("findings", result.Findings.Count);
        w.WriteNumber("compared_frames", result.ComparedFrames);
        w.WriteBoolean("stills", stills);
        w.WriteBoolean("temporal_rules", !stills);
        w.WriteBoolean("ground_rules", groundRules);
        w.WriteBoolean("baseline_rule", baseline);
        w.WritePropertyName("fps");
        w.WriteRawValue(ScoreJsonWriter.FormatFloat(fps), skipInputValidation: true);
        foreach (string sev in new[] { "error", "warning", "info" })
        {
            w.WriteNumber(sev + "s", result.Findings.Count(f => AuditJsonWriter.SeverityName(f.Severity) == sev));
        }

        w.WriteStartArray("rules");
        foreach (IAuditRule r in AuditRuleCatalogue.Rules)
        {
            AuditRuleInfo rule = r.Info;
            w.WriteStartObject();
            w.WriteString("id", rule.Id);
            w.WriteString("name", rule.Name);
            w.WriteString("severity", AuditJsonWriter.SeverityName(rule.Severity));
            w.WriteBoolean("ran", Ran(r, groundRules, stills, baseline));
            w.WriteNumber("findings", result.Findings.Count(f => f.Rule == rule.Id));
            w.WriteNumber("frames", result.Findings.Where(f => f.Rule == rule.Id).Select(f => f.Ordinal).Distinct().Count());
            w.WriteString("limit", rule.Limit);
            w.WriteEndObject();
        }

        w.WriteEndArray();
        w.WriteEndObject();
    }

    private static void WriteSummary(TextWriter o, AuditResult result, string outPath, bool groundRules, bool stills)
    {
        long flagged = result.Findings.Select(f => f.Ordinal).Distinct().LongCount();
        o.WriteLine(F($"Audited {result.Frames} frames: {flagged} with findings ({(result.Frames == 0 ? 0 : 100.0 * flagged / result.Frames):0.0} %), {result.Findings.Count} findings -> {outPath}"));
        if (result.ComparedFrames > 0)
        {
            double mean = result.RankedFrames.Where(f => f.Disagreement is not null).Average(f => f.Disagreement!.Value);
            o.WriteLine(F($"Compared with the baseline on {result.ComparedFrames} frames; mean disagreement (1 - F1@0.50) {mean:0.000}"));
        }

        o.WriteLine();
        o.WriteLine("rule     name                   severity  findings  frames  limit");
        foreach (AuditRuleInfo rule in AuditRules.All)
        {
            int count = result.Findings.Count(f => f.Rule == rule.Id);
            int frames = result.Findings.Where(f => f.Rule == rule.Id).Select(f => f.Ordinal).Distinct().Count();
            o.WriteLine(F($"{rule.Id,-8} {rule.Name,-22} {AuditJsonWriter.SeverityName(rule.Severity),-8}  {count,8}  {frames,6}  {rule.Limit}"));
        }

        if (!groundRules)
        {
            o.WriteLine();
            o.WriteLine("Ground-geometry rules (" + IdRange(AuditRuleFamily.Ground) + ") did not run: they need --camera camera.json.");
        }

        if (stills)
        {
            o.WriteLine();
            o.WriteLine("Temporal rules (" + IdRange(AuditRuleFamily.Temporal) + ") did not run: --stills says the frames are independent stills.");
        }
    }

    private static void WriteOverlays(
        string dir,
        AuditResult result,
        string predPath,
        string? baselinePath,
        string? framesRoot,
        AuditSettings settings,
        LaneSourceOpener opener,
        int count,
        List<(int Rank, string Frame, string Path, byte[] Jpeg, int Width, int Height)> drawn,
        CancellationToken cancellationToken)
    {
        var worst = result.RankedFrames.Where(f => f.Score > 0).Take(count).ToList();
        if (worst.Count == 0)
        {
            return;
        }

        Directory.CreateDirectory(dir);
        var rankOf = new Dictionary<long, int>();
        for (int i = 0; i < worst.Count; i++)
        {
            rankOf[worst[i].Ordinal] = i + 1;
        }

        var wantedKeys = new HashSet<string>(worst.Select(w => w.Frame), StringComparer.Ordinal);
        var baseRecords = new Dictionary<string, LaneRecord>(StringComparer.Ordinal);
        var request = new LaneSourceRequest { Size = settings.Size };
        if (baselinePath is not null)
        {
            using ILaneRecordSource b = opener(baselinePath, request);
            while (b.TryRead(out LaneRecord r))
            {
                if (wantedKeys.Contains(r.Frame))
                {
                    baseRecords[r.Frame] = r;
                }
            }
        }

        var byOrdinal = result.Findings.GroupBy(f => f.Ordinal).ToDictionary(g => g.Key, g => (IReadOnlyList<AuditFinding>)[.. g]);
        using ILaneRecordSource pred = opener(predPath, request);
        long ordinal = 0;
        while (pred.TryRead(out LaneRecord r))
        {
            cancellationToken.ThrowIfCancellationRequested();
            if (rankOf.TryGetValue(ordinal, out int rank))
            {
                baseRecords.TryGetValue(r.Frame, out LaneRecord? b);
                // The size the audit used for this frame (AuditRun): the record's, the baseline record's, --size, the camera's.
                (int w, int h) = r.Width is int rw && r.Height is int rh ? (rw, rh)
                    : b?.Width is int bw && b.Height is int bh ? (bw, bh)
                    : settings.SizeWithoutRecordSize() ?? throw new InvalidOperationException("an audited frame without a size");
                string? image = framesRoot is null ? null : Path.Combine(framesRoot, r.Frame);
                using Mat overlay = AuditOverlayPainter.Paint(image, r, b, w, h, byOrdinal.GetValueOrDefault(ordinal) ?? []);
                string name = F($"{rank:000}_") + string.Concat(r.Frame.Select(c => char.IsLetterOrDigit(c) || c is '-' or '_' or '.' ? c : '_'));
                string file = Path.Combine(dir, Path.ChangeExtension(name, ".png"));
                MaskFiles.Write(file, overlay);

                // A 320 px wide JPEG of it for the page (common practice for a gallery: small, embedded, links to the file).
                double k = Math.Min(1.0, ThumbnailWidth / (double)overlay.Width);
                using Mat small = new();
                Cv2.Resize(overlay, small, new Size(Math.Max(1, (int)Math.Round(overlay.Width * k)), Math.Max(1, (int)Math.Round(overlay.Height * k))), 0, 0, InterpolationFlags.Area);
                Cv2.ImEncode(".jpg", small, out byte[] jpeg, new ImageEncodingParam(ImwriteFlags.JpegQuality, 80));
                drawn.Add((rank, r.Frame, file, jpeg, small.Width, small.Height));
            }

            ordinal++;
        }
    }

    /// <summary>Width of the overlay thumbnails on the page, px.</summary>
    private const int ThumbnailWidth = 320;

    /// <summary>A file's path relative to the page's folder, each segment URL-escaped, '/' separated.</summary>
    private static string Href(string pageDir, string file) =>
        string.Join('/', Path.GetRelativePath(pageDir, Path.GetFullPath(file)).Split(Path.DirectorySeparatorChar).Select(Uri.EscapeDataString));

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
