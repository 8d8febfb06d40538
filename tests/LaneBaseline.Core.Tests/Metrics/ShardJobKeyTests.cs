using System.Reflection;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Sharding;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

/// <summary>
/// The shard job key (<see cref="ScoreStateHeader.JobKey"/>) must change when any setting of the job changes, or
/// <c>merge</c> would join shards scored with different settings (common practice for sharded jobs: every shard of one
/// job runs with the same parameters). The walk covers every settable property of the header and of
/// <see cref="ScoreSettings"/>, so a property added later is checked without editing this test.
/// </summary>
public sealed class ShardJobKeyTests
{
    private static readonly ScoreStateHeader Baseline = new()
    {
        Shard = new ShardSpec(0, 3),
        Truth = "truth.lanes.jsonl",
        TruthFrames = 10,
        Systems = [new ScoredSystem("a", "a.lanes.jsonl")],
        Settings = new ScoreSettings(),
        Resamples = 1000,
        Seed = 0,
    };

    public static TheoryData<string, string> KeyedProperties()
    {
        var data = new TheoryData<string, string>();
        foreach (PropertyInfo p in Settable(typeof(ScoreStateHeader)))
        {
            data.Add(nameof(ScoreStateHeader), p.Name);
        }

        foreach (PropertyInfo p in Settable(typeof(ScoreSettings)))
        {
            data.Add(nameof(ScoreSettings), p.Name);
        }

        return data;
    }

    // Property walk: changing any one settable property (not marked [NotInJobKey]) changes the key.
    [Theory]
    [MemberData(nameof(KeyedProperties))]
    public void EveryKeyedProperty_ChangesTheKey(string owner, string property)
    {
        ScoreStateHeader changed = owner == nameof(ScoreSettings)
            ? Baseline with { Settings = With(Baseline.Settings, property) }
            : With(Baseline, property);
        Assert.NotEqual(Baseline.JobKey(), changed.JobKey());
    }

    // Every settable property is in the key unless it says why not; the key names exactly those properties.
    [Fact]
    public void Key_NamesEverySettableProperty_ExceptTheExplainedOnes()
    {
        foreach (Type type in new[] { typeof(ScoreStateHeader), typeof(ScoreSettings) })
        {
            PropertyInfo[] all = [.. type.GetProperties(BindingFlags.Public | BindingFlags.Instance).Where(p => p.SetMethod is { IsPublic: true })];
            string[] keyed = [.. ShardJobKey.Properties(type).Select(p => p.Name)];
            foreach (PropertyInfo p in all)
            {
                NotInJobKeyAttribute? skip = p.GetCustomAttribute<NotInJobKeyAttribute>();
                Assert.True(skip is not null || keyed.Contains(p.Name), $"{type.Name}.{p.Name} is settable but not in the job key");
                Assert.True(skip is null || !string.IsNullOrWhiteSpace(skip.Reason), $"{type.Name}.{p.Name} is left out without a reason");
            }
        }

        string key = Baseline.JobKey();
        Assert.Contains("LaneWidthPx=null", key, StringComparison.Ordinal);
        Assert.Contains("Seed=0", key, StringComparison.Ordinal);
        Assert.DoesNotContain("InputHashes", key, StringComparison.Ordinal);
    }

    // The shard index is the one thing that differs between the shards of one job.
    [Fact]
    public void ShardIndex_DoesNotChangeTheKey_ShardCount_Does()
    {
        Assert.Equal(Baseline.JobKey(), (Baseline with { Shard = new ShardSpec(2, 3) }).JobKey());
        Assert.NotEqual(Baseline.JobKey(), (Baseline with { Shard = new ShardSpec(0, 4) }).JobKey());
    }

    private static IEnumerable<PropertyInfo> Settable(Type type) => ShardJobKey.Properties(type);

    /// <summary>A copy of a record with one property set to a value different from the baseline's.</summary>
    private static T With<T>(T record, string property)
        where T : class
    {
        var copy = (T)typeof(T).GetMethod("<Clone>$")!.Invoke(record, null)!;
        PropertyInfo p = typeof(T).GetProperty(property)!;
        p.SetValue(copy, OtherValue(p, p.GetValue(record)));
        return copy;
    }

    private static object? OtherValue(PropertyInfo p, object? current)
    {
        Type t = Nullable.GetUnderlyingType(p.PropertyType) ?? p.PropertyType;
        object value = t switch
        {
            _ when t == typeof(int) => current is int i ? i + 1 : 7,
            _ when t == typeof(ulong) => current is ulong u ? u + 1 : 7UL,
            _ when t == typeof(double) => current is double d ? d + 0.5 : 2.5,
            _ when t == typeof(bool) => current is not true,
            _ when t == typeof(string) => current + "-other",
            _ when t == typeof(BootstrapUnit) => current is BootstrapUnit.Sequence ? BootstrapUnit.Frame : BootstrapUnit.Sequence,
            _ when t == typeof(CameraModel) => CameraModel.CreateDefault(640, 480),
            _ when t == typeof(ScoreSettings) => new ScoreSettings { LaneWidthPx = 9 },
            _ when t == typeof(IReadOnlyList<IouThreshold>) => new[] { IouThreshold.Parse("0.40") },
            _ when t == typeof(IReadOnlyList<ScoredSystem>) => new[] { new ScoredSystem("a", "a.lanes.jsonl"), new ScoredSystem("b", "b.lanes.jsonl") },
            _ => throw new InvalidOperationException($"{p.DeclaringType!.Name}.{p.Name}: add a sample value of type {t.Name} to this test"),
        };
        return value;
    }
}
