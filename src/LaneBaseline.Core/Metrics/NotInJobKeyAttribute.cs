namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Marks a property that <see cref="ShardJobKey"/> leaves out of a shard job's key, with the reason (it differs between the
/// shards of one job, or it is checked on its own).
/// </summary>
[AttributeUsage(AttributeTargets.Property)]
public sealed class NotInJobKeyAttribute(string reason) : Attribute
{
    /// <summary>Why the property is not part of the key.</summary>
    public string Reason { get; } = reason;
}
