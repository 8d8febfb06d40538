using System.Text.Json.Serialization;

namespace LaneBaseline.Core.Audit;

/// <summary>Source-generated JSON metadata of <see cref="AuditJob"/> (options in <see cref="AuditJobJson"/>).</summary>
[JsonSourceGenerationOptions(IncludeFields = false)]
[JsonSerializable(typeof(AuditJob))]
internal sealed partial class AuditJobJsonContext : JsonSerializerContext;
