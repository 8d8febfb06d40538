using System.Globalization;
using System.Text.RegularExpressions;
using ScottPlot;

// IDISP004: plottables returned by plot.Add.* are owned and disposed by the Plot, which each chart disposes.
#pragma warning disable IDISP004

namespace LaneBaseline.Reporting;

/// <summary>
/// The report's charts, drawn with ScottPlot 5 and returned as inline SVG. ScottPlot numbers its clip-path ids with
/// a process-wide counter, so each SVG's ids are renumbered under a per-chart prefix: the same inputs then give the
/// same bytes, and several charts can share one page without id clashes.
/// </summary>
internal static partial class Charts
{
    /// <summary>Series colours, one per system in file order (<see cref="Palette.Systems"/>; cycles after six).</summary>
    public static readonly string[] SystemColors = [.. Palette.Systems];

    private const string Font = "DejaVu Sans";

    public static string SystemColor(int index) => SystemColors[index % SystemColors.Length];

    /// <summary>The tag prefix of rendered severity sweeps.</summary>
    public const string SeverityPrefix = "severity=";

    private static readonly string[] SeverityNames = ["error", "warning", "info"];

    /// <summary>
    /// Sets category ticks; with more than <see cref="CrowdedLabels"/> labels they are shortened to
    /// <see cref="MaxLabelChars"/> characters and rotated 45° so they do not overlap. Returns whether they were.
    /// </summary>
    internal static bool CategoryTicks(Plot plot, double[] positions, IReadOnlyList<string> labels)
    {
        bool crowded = labels.Count > CrowdedLabels;
        plot.Axes.Bottom.SetTicks(positions, [.. labels.Select(l => crowded ? Shorten(l) : l)]);
        if (crowded)
        {
            plot.Axes.Bottom.TickLabelStyle.Rotation = -45;
            plot.Axes.Bottom.TickLabelStyle.Alignment = Alignment.MiddleRight;
            // Room for the slanted labels: about 7 px per character at 45 degrees (12 px DejaVu Sans, common practice).
            plot.Axes.Bottom.MinimumSize = 24 + (5.2f * labels.Max(l => Shorten(l).Length));
        }

        return crowded;
    }

    /// <summary>Above this many category labels the x labels are rotated and shortened.</summary>
    internal const int CrowdedLabels = 8;

    /// <summary>Longest rotated label; longer ones keep their start and end around an ellipsis.</summary>
    internal const int MaxLabelChars = 18;

    internal static string Shorten(string label) =>
        label.Length <= MaxLabelChars ? label : string.Concat(label.AsSpan(0, 10), "…", label.AsSpan(label.Length - (MaxLabelChars - 11)));

    private static Plot NewPlot()
    {
        var plot = new Plot();
        plot.Font.Set(Font);
        return plot;
    }

    /// <summary>Renders and normalises the SVG: no XML prolog, a viewBox for fluid width, stable ids.</summary>
    internal static string ToSvg(Plot plot, int width, int height, string idPrefix, string label)
    {
        string svg = plot.GetSvgXml(width, height);
        int start = svg.IndexOf("<svg", StringComparison.Ordinal);
        svg = svg[start..].Trim();
        var ids = new Dictionary<string, string>(StringComparer.Ordinal);
        svg = ClipId().Replace(svg, m =>
        {
            if (!ids.TryGetValue(m.Value, out string? id))
            {
                id = idPrefix + "-" + ids.Count.ToString(CultureInfo.InvariantCulture);
                ids.Add(m.Value, id);
            }

            return id;
        });
        svg = TrailingListComma().Replace(svg, "$1=\"$2\"");
        string size = string.Create(CultureInfo.InvariantCulture, $"width=\"{width}\" height=\"{height}\"");
        int tagEnd = svg.IndexOf('>', StringComparison.Ordinal);
        string openTag = svg[..tagEnd].Replace(
            size,
            string.Create(CultureInfo.InvariantCulture, $"viewBox=\"0 0 {width} {height}\" {size} role=\"img\" aria-label=\"{System.Net.WebUtility.HtmlEncode(label)}\""),
            StringComparison.Ordinal);
        return openTag + svg[tagEnd..];
    }

    [GeneratedRegex("cl_[0-9A-Za-z]+")]
    private static partial Regex ClipId();

    [GeneratedRegex("( [xy])=\"([^\"]*?),\\s*\"")]
    private static partial Regex TrailingListComma();
}
