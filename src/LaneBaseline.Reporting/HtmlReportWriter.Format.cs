using System.Globalization;
using System.Net;
using System.Text;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

// Number, cell and text formatting shared by every section, and the page style sheet.
public static partial class HtmlReportWriter
{
    private static string Swatch(int system) =>
        "<span class=\"swatch\" style=\"background:" + Charts.SystemColor(system) + "\"></span>";

    private static string Td(string key, long value) =>
        "<td data-key=\"" + E(key) + "\">" + I(value) + "</td>";

    private static string TdCi(string key, double value, Ci? ci)
    {
        var sb = new StringBuilder("<td data-key=\"").Append(E(key)).Append("\" data-value=\"").Append(R(value)).Append("\">").Append(F(value, "0.000"));
        if (ci is Ci c)
        {
            sb.Append(" <span class=\"ci\">[").Append(F(c.Low, "0.000")).Append(", ").Append(F(c.High, "0.000")).Append("]</span>");
        }

        return sb.Append("</td>").ToString();
    }

    /// <summary>Fixed-precision invariant text; "–" for a missing (NaN) value; no minus sign on a value that rounds to zero ("-0.000").</summary>
    internal static string F(double value, string format)
    {
        if (!double.IsFinite(value))
        {
            return "–";
        }

        string s = value.ToString(format, CultureInfo.InvariantCulture);
        return s.Length > 1 && s[0] == '-' && s.AsSpan(1).IndexOfAnyExcept("0.") < 0 ? s[1..] : s;
    }

    /// <summary>Round-trip invariant text for data attributes; empty for NaN.</summary>
    internal static string R(double value) =>
        double.IsFinite(value) ? value.ToString("R", CultureInfo.InvariantCulture) : string.Empty;

    private static string I(long value) => value.ToString(CultureInfo.InvariantCulture);

    private static string Count(long n, string noun) => I(n) + " " + noun + (n == 1 ? string.Empty : "s");

    private static string Time(DateTimeOffset t) => t.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture);

    private static string E(string text) => WebUtility.HtmlEncode(text);

    private const string Css = """
        * { box-sizing:border-box; }
        body { margin:0 auto; max-width:1200px; padding:16px 24px 40px; color:var(--ink); background:#fff;
               font:15px/1.5 "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; }
        h1 { font-size:1.8em; margin:0.2em 0; } h2 { font-size:1.3em; margin:0 0 0.4em; border-bottom:2px solid var(--rule); padding-bottom:0.2em; }
        h3 { font-size:1.05em; margin:1em 0 0.4em; }
        .meta { color:var(--muted); margin:0 0 0.6em; }
        .caution-banner { background:var(--caution-bg); border-left:5px solid var(--caution-edge); padding:8px 12px; margin:0.6em 0; }
        nav { position:sticky; top:0; background:#fff; border-bottom:1px solid var(--rule); padding:6px 0; z-index:1;
              display:flex; flex-wrap:wrap; gap:4px 14px; }
        nav a { color:var(--accent); text-decoration:none; font-size:0.92em; }
        section { margin:28px 0; }
        .scroll { overflow-x:auto; }
        table { border-collapse:collapse; margin:8px 0; font-variant-numeric:tabular-nums; }
        th, td { border-bottom:1px solid var(--rule); padding:5px 10px; text-align:right; white-space:nowrap; vertical-align:top; }
        th:first-child, thead th { text-align:left; } thead th { background:var(--band); white-space:normal; vertical-align:bottom; }
        #headline-table thead th { max-width:7.5em; }
        #settings-table td, #versions-table td { text-align:left; white-space:normal; word-break:break-all; }
        #tag-compare-table th { text-align:left; }
        td.t { text-align:left; } td.worse { color:var(--miss); font-weight:600; } td.better { color:var(--truth); } td.msg { white-space:normal; min-width:16em; }
        .ci { display:block; color:var(--muted); font-size:0.82em; }
        .swatch { display:inline-block; width:0.8em; height:0.8em; border-radius:2px; margin-right:6px; vertical-align:baseline; }
        figure { margin:8px 0; }
        figure.chart svg { display:block; width:100%; max-width:900px; height:auto; }
        figcaption { color:var(--muted); font-size:0.88em; }
        .note, .empty { color:var(--muted); }
        .legend .key { margin-right:18px; white-space:nowrap; }
        .legend .line { display:inline-block; width:28px; vertical-align:middle; margin-right:6px; border-top-style:solid; }
        .legend .truth { border-top-width:5px; border-top-color:var(--truth); }
        .legend .pred { border-top-width:2px; border-top-color:var(--pred); }
        .legend .miss { border-top-width:5px; border-top-color:var(--miss); }
        .legend .fp { border-top-width:2px; border-top-style:dashed; border-top-color:var(--fp); }
        .coverage p.warn { border-left:5px solid var(--fp); padding:4px 12px; background:var(--caution-bg); margin:0.4em 0; }
        .verdict { font-size:1.05em; font-weight:600; border-left:5px solid var(--accent); padding:6px 12px; background:var(--band); }
        .gallery { display:grid; grid-template-columns:repeat(auto-fill, minmax(260px, 1fr)); gap:12px; }
        .thumb { margin:0; border:1px solid var(--rule); padding:6px; background:var(--band); }
        .thumb img { display:block; width:100%; height:auto; }
        .thumb figcaption { margin-top:4px; word-break:break-all; }
        details > summary { cursor:pointer; color:var(--accent); margin:6px 0; }
        footer { color:var(--muted); font-size:0.85em; border-top:1px solid var(--rule); padding-top:8px; }
        @media (max-width:700px) { body { padding:8px 10px 24px; font-size:14px; } th, td { padding:4px 6px; } h1 { font-size:1.4em; } }
        @media print {
          body { max-width:none; padding:0; font-size:11pt; } nav { display:none; }
          section, figure, table, .thumb { break-inside:avoid; } h2 { break-after:avoid; }
          .scroll { overflow:visible; } .gallery { grid-template-columns:repeat(3, 1fr); }
          .caution-banner { border:1px solid var(--caution-edge); } details > summary { display:none; }
        }

        """;
}
