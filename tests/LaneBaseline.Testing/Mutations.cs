using CsCheck;

namespace LaneBaseline.Testing;

/// <summary>Byte-level mutations of a valid input for fuzzing readers (replace, insert, delete, truncate).</summary>
public static class Mutations
{
    /// <summary>A generator of mutated copies of <paramref name="valid"/> (1 to 6 edits, sometimes truncated).</summary>
    public static Gen<byte[]> Of(byte[] valid)
    {
        ArgumentNullException.ThrowIfNull(valid);
        return Gen.Select(Gen.Select(Gen.Int[0, Math.Max(0, valid.Length - 1)], Gen.Byte, Gen.Int[0, 3]).Array[1, 6], Gen.Int[0, 9])
            .Select((edits, cut) =>
            {
                var bytes = new List<byte>(valid);
                foreach ((int pos, byte b, int op) in edits)
                {
                    if (bytes.Count == 0)
                    {
                        break;
                    }

                    int p = Math.Min(pos, bytes.Count - 1);
                    switch (op)
                    {
                        case 0: bytes[p] = b; break;
                        case 1: bytes.Insert(p, b); break;
                        case 2: bytes.RemoveAt(p); break;
                        default: bytes[p] = (byte)"{}[]\",:-.0e"[b % 11]; break;
                    }
                }

                if (cut == 0 && bytes.Count > 1)
                {
                    bytes.RemoveRange(bytes.Count / 2, bytes.Count - (bytes.Count / 2));
                }

                return bytes.ToArray();
            });
    }
}
