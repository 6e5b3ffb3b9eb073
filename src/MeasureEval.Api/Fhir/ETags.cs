namespace MeasureEval.Api.Fhir;

/// <summary>FHIR uses weak ETags carrying the version id: <c>W/"3"</c>.</summary>
public static class ETags
{
    public static string Of(int versionId) => $"W/\"{versionId}\"";

    /// <summary>Reads <c>W/"3"</c>, <c>"3"</c> or <c>3</c>. Returns false for anything else.</summary>
    public static bool TryParseVersion(string? value, out int versionId)
    {
        versionId = 0;
        if (string.IsNullOrWhiteSpace(value))
        {
            return false;
        }

        var text = value.Trim();
        if (text.StartsWith("W/", StringComparison.OrdinalIgnoreCase))
        {
            text = text[2..];
        }

        text = text.Trim('"');
        return int.TryParse(text, System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out versionId) && versionId > 0;
    }
}
