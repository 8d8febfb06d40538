using System.Globalization;
using System.Text;

namespace LaneBaseline.Core.Sharding;

/// <summary>
/// Shard K of N: a deterministic partition of frames by a stable hash of their sequence (<see cref="SequenceKey"/>;
/// 64-bit FNV-1a of its UTF-8 bytes, modulo N), so a shard holds whole sequences and adding frames never moves other
/// frames between shards.
/// </summary>
/// <param name="Index">Zero-based shard index K.</param>
/// <param name="Count">Number of shards N.</param>
/// <remarks>References: [1] G. Fowler, L. C. Noll, K.-P. Vo, D. Eastlake, "The FNV Non-Cryptographic Hash
/// Algorithm", IETF draft-eastlake-fnv.</remarks>
public readonly record struct ShardSpec(int Index, int Count)
{
    /// <summary>Parses "K/N" with 0 &lt;= K &lt; N.</summary>
    /// <exception cref="FormatException">Not of that form.</exception>
    public static ShardSpec Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        string[] parts = text.Split('/');
        if (parts.Length != 2
            || !int.TryParse(parts[0], NumberStyles.None, CultureInfo.InvariantCulture, out int k)
            || !int.TryParse(parts[1], NumberStyles.None, CultureInfo.InvariantCulture, out int n)
            || n < 1 || k >= n)
        {
            throw new FormatException($"'{text}' is not a shard K/N with 0 <= K < N (e.g. 0/4)");
        }

        return new ShardSpec(k, n);
    }

    /// <summary>Whether the frame belongs to this shard: its sequence (<see cref="SequenceKey.Of"/>) hashes to it.</summary>
    public bool ContainsFrame(string frameKey) => Count == 1 || Contains(SequenceKey.Of(frameKey));

    /// <summary>Whether a key (a sequence name) hashes to this shard.</summary>
    public bool Contains(string key) => Count == 1 || (int)(Fnv1a64(key) % (ulong)Count) == Index;

    /// <summary>64-bit FNV-1a of the UTF-8 bytes of <paramref name="text"/>.</summary>
    public static ulong Fnv1a64(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        ulong hash = 0xcbf29ce484222325UL;
        int max = Encoding.UTF8.GetMaxByteCount(text.Length);
        Span<byte> bytes = max <= 256 ? stackalloc byte[256] : new byte[max];
        int n = Encoding.UTF8.GetBytes(text, bytes);
        foreach (byte b in bytes[..n])
        {
            hash ^= b;
            hash *= 0x100000001b3UL;
        }

        return hash;
    }

    /// <inheritdoc />
    public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"{Index}/{Count}");
}
