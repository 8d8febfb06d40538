using System.Reflection;
using System.Text.Json;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Geometry;
using Xunit;

namespace LaneBaseline.Core.Tests.Audit;

/// <summary>
/// The audit job a shard state carries (issue 13 item 4): every settable property of <see cref="AuditJob"/> and
/// <see cref="AuditSettings"/> survives the state's JSON and takes part in the job comparison, so a setting added later
/// cannot silently vanish in <c>merge</c>. The test walks the properties by reflection; a property of a type it has no
/// sample value for fails it until the sample is added here (and the JSON can write the type).
/// </summary>
public sealed class AuditJobTests
{
    private static readonly AuditJob Defaults = new() { Pred = "p.lanes.jsonl", Settings = new AuditSettings() };

    public static TheoryData<string> Properties()
    {
        var data = new TheoryData<string>();
        foreach (PropertyInfo p in Settable(typeof(AuditJob)))
        {
            if (p.PropertyType == typeof(AuditSettings))
            {
                foreach (PropertyInfo q in Settable(typeof(AuditSettings)))
                {
                    data.Add("Settings." + q.Name);
                }
            }
            else
            {
                data.Add(p.Name);
            }
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(Properties))]
    public void EveryProperty_RoundTripsThroughTheState_AndChangesTheJobKey(string name)
    {
        AuditJob changed = With(Defaults, name);
        Assert.NotEqual(Defaults, changed); // the sample differs from the default

        AuditJob back = RoundTrip(changed);
        Assert.Equal(changed, back);
        Assert.Equal(Get(changed, name), Get(back, name));

        // The comparison merge makes names the changed setting.
        var a = Defaults.Entries().ToDictionary(kv => kv.Key, kv => kv.Value);
        var b = changed.Entries().ToDictionary(kv => kv.Key, kv => kv.Value);
        Assert.Contains(a.Keys.Union(b.Keys), k => a.GetValueOrDefault(k) != b.GetValueOrDefault(k));
    }

    [Fact]
    public void Defaults_RoundTrip_AndAnUnknownKeyIsRefused()
    {
        Assert.Equal(Defaults, RoundTrip(Defaults));
        string json = Serialize(Defaults).Replace("\"min_mask_rows\"", "\"min_mask_rowz\"", StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(json);
        Assert.Throws<JsonException>(() => AuditJobJson.Read(doc.RootElement));
    }

    private static IEnumerable<PropertyInfo> Settable(Type t) =>
        t.GetProperties(BindingFlags.Public | BindingFlags.Instance).Where(p => p.SetMethod is { IsPublic: true });

    private static AuditJob With(AuditJob job, string name)
    {
        if (name.StartsWith("Settings.", StringComparison.Ordinal))
        {
            PropertyInfo q = typeof(AuditSettings).GetProperty(name["Settings.".Length..])!;
            AuditSettings s = job.Settings with { };
            q.SetValue(s, Sample(q.PropertyType, q.GetValue(s)));
            return job with { Settings = s };
        }

        PropertyInfo p = typeof(AuditJob).GetProperty(name)!;
        AuditJob copy = job with { };
        p.SetValue(copy, Sample(p.PropertyType, p.GetValue(copy)));
        return copy;
    }

    private static object? Get(AuditJob job, string name) =>
        name.StartsWith("Settings.", StringComparison.Ordinal)
            ? typeof(AuditSettings).GetProperty(name["Settings.".Length..])!.GetValue(job.Settings)
            : typeof(AuditJob).GetProperty(name)!.GetValue(job);

    // A value of the property's type that differs from its default.
    private static object Sample(Type type, object? current) => type switch
    {
        _ when type == typeof(double) => (double)current! + 1.25,
        _ when type == typeof(double?) => 251.5,
        _ when type == typeof(int) => (int)current! + 3,
        _ when type == typeof(bool) => !(bool)current!,
        _ when type == typeof(string) => "other/" + current,
        _ when type == typeof((int Width, int Height)?) => (640, 360),
        _ when type == typeof(CameraModel) => CameraModel.CreateDefault(640, 360),
        _ => throw new NotSupportedException($"no sample value for a property of type {type.Name}: add one to AuditJobTests.Sample (and make sure AuditJobJson writes it)"),
    };

    private static string Serialize(AuditJob job)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms))
        {
            AuditJobJson.Write(w, job);
        }

        return System.Text.Encoding.UTF8.GetString(ms.ToArray());
    }

    private static AuditJob RoundTrip(AuditJob job)
    {
        using JsonDocument doc = JsonDocument.Parse(Serialize(job));
        return AuditJobJson.Read(doc.RootElement);
    }
}
