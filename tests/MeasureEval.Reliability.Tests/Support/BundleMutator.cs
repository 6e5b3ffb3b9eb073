using System.Text;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>Seeded mutations of a valid transaction: what a broken feed or a broken network sends.</summary>
public static class BundleMutator
{
    private static readonly string[] WrongValues = ["12", "\"x\"", "true", "null", "[]", "{}", "[1,2]", "-0", "1e999", "99999999999999999999999999999999999"];

    public static byte[] Mutate(string json, Random random)
    {
        var text = json;
        var count = 1 + random.Next(3);
        for (var i = 0; i < count; i++)
        {
            text = random.Next(12) switch
            {
                0 => text[..random.Next(text.Length)],
                1 => ReplaceValue(text, random, WrongValues[random.Next(WrongValues.Length)]),
                2 => Nest(text, random),
                3 => ReplaceValue(text, random, "\"\\ud800\\udfff\\ud800\""),
                4 => DuplicateKey(text, random),
                5 => text.Replace("Patient/", random.Next(2) == 0 ? "urn:uuid:00000000-dead-4000-8000-000000000000#" : "Patient/../", StringComparison.Ordinal),
                6 => text.Replace("\"PUT\"", random.Next(2) == 0 ? "\"PATCH\"" : "\"POST\"", StringComparison.Ordinal),
                7 => text.Insert(random.Next(text.Length), "{[,:\"}]"[random.Next(7)].ToString()),
                8 => ReplaceValue(text, random, "\"" + new string('9', 400) + "\""),
                9 => text.Replace("\"transaction\"", random.Next(2) == 0 ? "\"batch\"" : "\"document\"", StringComparison.Ordinal),
                10 => ReplaceValue(text, random, "1" + new string('0', 320)),
                _ => text,
            };
        }

        var bytes = Encoding.UTF8.GetBytes(text);
        if (random.Next(4) == 0 && bytes.Length > 0)
        {
            // Raw byte flips, including invalid UTF-8 sequences.
            for (var f = 0; f < 1 + random.Next(4); f++)
            {
                bytes[random.Next(bytes.Length)] ^= (byte)(1 << random.Next(8));
            }
        }

        return bytes;
    }

    /// <summary>Replaces the value after a random ':' (up to the next ',' or '}') by <paramref name="value"/>.</summary>
    private static string ReplaceValue(string text, Random random, string value)
    {
        var colon = text.IndexOf(':', random.Next(Math.Max(1, text.Length)));
        if (colon < 0)
        {
            return text;
        }

        var end = text.IndexOfAny([',', '}'], colon + 1);
        return end < 0 ? text : string.Concat(text.AsSpan(0, colon + 1), value, text.AsSpan(end));
    }

    private static string Nest(string text, Random random)
    {
        var depth = random.Next(2) == 0 ? 70 : 5000;
        var nested = new StringBuilder().Append('[', depth).Append('1').Append(']', depth).ToString();
        return ReplaceValue(text, random, random.Next(2) == 0 ? nested : "{\"extension\":" + nested + "}");
    }

    private static string DuplicateKey(string text, Random random)
    {
        var at = text.IndexOf("\"id\":", random.Next(Math.Max(1, text.Length)), StringComparison.Ordinal);
        return at < 0 ? text.Replace("\"status\":\"final\",", "\"status\":\"final\",\"status\":\"amended\",", StringComparison.Ordinal) : text.Insert(at, "\"id\":\"dup\",");
    }
}
