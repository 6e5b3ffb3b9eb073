using System.Text;

namespace MeasureEval.Analytics.Reports;

/// <summary>RFC 4180 fields, with a leading apostrophe on text a spreadsheet would run as a formula (=, +, -, @).</summary>
internal static class CsvText
{
    public static void Row(StringBuilder csv, params string?[] fields)
    {
        for (var i = 0; i < fields.Length; i++)
        {
            if (i > 0)
            {
                csv.Append(',');
            }

            csv.Append(Field(fields[i]));
        }

        csv.Append("\r\n");
    }

    /// <summary>A text field that came from data (names, codes): guarded against formula injection.</summary>
    public static string Text(string? value) =>
        value is { Length: > 0 } && value[0] is '=' or '+' or '-' or '@' or '\t' or '\r' ? "'" + value : value ?? string.Empty;

    private static string Field(string? value)
    {
        value ??= string.Empty;
        return value.IndexOfAny([',', '"', '\r', '\n']) >= 0 ? "\"" + value.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : value;
    }
}
