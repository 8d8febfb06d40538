using System.Collections;
using System.Globalization;
using System.Reflection;
using System.Text;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// The canonical text of a settings record for comparing the shards of one job: every public instance property that
/// can be set (<c>init</c> or <c>set</c>), in name order, as <c>name=value</c> lines, unless it is marked
/// <see cref="NotInJobKeyAttribute"/>. A new setting is in the key without anyone listing it, so <c>merge</c> can
/// never join shards that were scored with different values of it; a value of a type this class cannot write fails
/// loudly instead of being left out.
/// </summary>
public static class ShardJobKey
{
    /// <summary>The properties of <paramref name="type"/> that make up its key, in name order.</summary>
    public static IReadOnlyList<PropertyInfo> Properties(Type type)
    {
        ArgumentNullException.ThrowIfNull(type);
        return [.. type.GetProperties(BindingFlags.Public | BindingFlags.Instance)
            .Where(p => p.SetMethod is { IsPublic: true } && p.GetIndexParameters().Length == 0 && p.GetCustomAttribute<NotInJobKeyAttribute>() is null)
            .OrderBy(p => p.Name, StringComparer.Ordinal)];
    }

    /// <summary>The key of a settings record.</summary>
    public static string Of(object settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var b = new StringBuilder();
        foreach (PropertyInfo p in Properties(settings.GetType()))
        {
            b.Append(p.Name).Append('=');
            Append(b, p.GetValue(settings), p.Name);
            b.Append('\n');
        }

        return b.ToString();
    }

    private static void Append(StringBuilder b, object? value, string name)
    {
        switch (value)
        {
            case null:
                b.Append("null");
                break;
            case string s:
                b.Append('"').Append(s.Replace("\\", "\\\\", StringComparison.Ordinal).Replace("\"", "\\\"", StringComparison.Ordinal).Replace("\n", "\\n", StringComparison.Ordinal)).Append('"');
                break;
            case bool v:
                b.Append(v ? "true" : "false");
                break;
            case double v:
                b.Append(v.ToString("R", CultureInfo.InvariantCulture));
                break;
            case Enum v:
                b.Append(v.ToString());
                break;
            case IFormattable v when value is int or long or ulong or uint or short:
                b.Append(v.ToString(null, CultureInfo.InvariantCulture));
                break;
            case IouThreshold t:
                b.Append(t.Key);
                break;
            case Geometry.CameraModel camera:
                b.Append(camera.ToJson().ReplaceLineEndings(" "));
                break;
            case ScoredSystem system:
                Append(b, system.Name, name);
                b.Append('=');
                Append(b, system.Path, name);
                break;
            case ScoreSettings settings:
                b.Append('{').Append(Of(settings).Replace('\n', ';')).Append('}');
                break;
            case IEnumerable list:
                b.Append('[');
                bool first = true;
                foreach (object? item in list)
                {
                    if (!first)
                    {
                        b.Append(',');
                    }

                    Append(b, item, name);
                    first = false;
                }

                b.Append(']');
                break;
            default:
                throw new NotSupportedException($"job key: property {name} has a value of type {value.GetType().Name} that JobKey cannot write; teach JobKey.Append its canonical text or mark the property [NotInJobKey(reason)]");
        }
    }
}
