using System.Text.Json;
using System.Text.Json.Serialization;
using MeasureEval.Analytics.Population;
using MeasureEval.Analytics.Summaries;

namespace MeasureEval.Analytics.Reports;

/// <summary>The report's numbers as JSON: camelCase names, enums as strings, dates as yyyy-MM-dd, rates as fractions.</summary>
public static class ReportJson
{
    public static JsonSerializerOptions Options { get; } = new(JsonSerializerDefaults.Web)
    {
        Converters = { new JsonStringEnumConverter(JsonNamingPolicy.KebabCaseLower) },
        DefaultIgnoreCondition = JsonIgnoreCondition.Never,
        WriteIndented = true,
    };

    /// <summary>The same conventions on one line (a row of a streamed list).</summary>
    public static JsonSerializerOptions Compact { get; } = new(Options) { WriteIndented = false };

    public static string Serialize(MeasureReportData report) => JsonSerializer.Serialize(report, Options);

    public static string Serialize(IReadOnlyList<MeasureSummary> summaries) => JsonSerializer.Serialize(summaries, Options);
}
