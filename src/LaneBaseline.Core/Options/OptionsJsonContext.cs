using System.Text.Json.Serialization;

namespace LaneBaseline.Core.Options;

/// <summary>Source-generated JSON metadata of the option records (camelCase; NaN and infinities as named literals).</summary>
[JsonSourceGenerationOptions(PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase, NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals)]
[JsonSerializable(typeof(PipelineOptions))]
internal sealed partial class OptionsJsonContext : JsonSerializerContext;
