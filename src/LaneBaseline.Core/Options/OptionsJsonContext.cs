using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Buffers;
using System.Text.Json;
using System.Text.Json.Serialization;
using System.Text.Json.Serialization.Metadata;
using YamlDotNet.Core;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Core.Options;

/// <summary>Source-generated JSON metadata of the option records (camelCase; NaN and infinities as named literals).</summary>
[JsonSourceGenerationOptions(PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase, NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals)]
[JsonSerializable(typeof(PipelineOptions))]
internal sealed partial class OptionsJsonContext : JsonSerializerContext;
