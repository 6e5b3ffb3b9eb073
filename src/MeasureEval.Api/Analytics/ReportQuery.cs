using System.Globalization;
using MeasureEval.Analytics.Trends;
using MeasureEval.Api.Errors;
using MeasureEval.Engine;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Analytics;

/// <summary>The output forms of a report (HTML page, JSON, CSV).</summary>
public enum ReportOutput
{
    Html,
    Json,
    Csv,
}

/// <summary>
/// The query of a report call, checked as a whole: every bad parameter is reported, each with its name as the
/// issue's expression. Defaults: the current calendar year, no target, quarters, HTML.
/// </summary>
public sealed record ReportQuery(MeasurementPeriod Period, decimal? Target, TrendInterval Interval, ReportOutput Format)
{
    public static bool TryParse(IQueryCollection query, TimeProvider time, out ReportQuery parsed, out IReadOnlyList<FhirIssue> issues)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentNullException.ThrowIfNull(time);
        var found = new List<FhirIssue>();
        var year = DateOnly.FromDateTime(time.GetLocalNow().Date).Year;
        var start = Date(query, "periodStart", new DateOnly(year, 1, 1), found);
        var end = Date(query, "periodEnd", new DateOnly(year, 12, 31), found);
        if (found.Count == 0 && end < start)
        {
            found.Add(new FhirIssue(ReportErrorCodes.InvalidParameter, "periodEnd is before periodStart.", "periodEnd"));
        }

        decimal? target = null;
        if (Single(query, "target", found) is { } targetText)
        {
            if (decimal.TryParse(targetText, NumberStyles.AllowDecimalPoint, CultureInfo.InvariantCulture, out var t) && t is >= 0 and <= 1)
            {
                target = t;
            }
            else
            {
                found.Add(new FhirIssue(ReportErrorCodes.InvalidParameter, "target must be a rate between 0 and 1, such as 0.75.", "target"));
            }
        }

        var intervalText = Single(query, "interval", found);
        if (!TrendPeriods.TryParse(intervalText, out var interval))
        {
            found.Add(new FhirIssue(ReportErrorCodes.InvalidParameter, $"interval must be '{TrendPeriods.QuarterCode}' or '{TrendPeriods.Rolling12MonthsCode}'.", "interval"));
        }

        var format = ReportOutput.Html;
        switch (Single(query, "format", found))
        {
            case null or "html":
                break;
            case "json":
                format = ReportOutput.Json;
                break;
            case "csv":
                format = ReportOutput.Csv;
                break;
            default:
                found.Add(new FhirIssue(ReportErrorCodes.InvalidParameter, "format must be html, json or csv.", "format"));
                break;
        }

        issues = found;
        parsed = new ReportQuery(new MeasurementPeriod(start, end), target, interval, format);
        return found.Count == 0;
    }

    /// <summary>The query string that reproduces this report, in <paramref name="format"/> when given.</summary>
    public string ToQueryString(string? format = null)
    {
        var parts = new List<string>
        {
            $"periodStart={Period.Start.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)}",
            $"periodEnd={Period.End.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)}",
        };
        if (Target is { } t)
        {
            parts.Add($"target={t.ToString(CultureInfo.InvariantCulture)}");
        }

        parts.Add($"interval={Interval.Code()}");
        if (format is not null)
        {
            parts.Add($"format={format}");
        }

        return "?" + string.Join('&', parts);
    }

    private static string? Single(IQueryCollection query, string name, List<FhirIssue> issues)
    {
        var values = query[name];
        if (values.Count > 1)
        {
            issues.Add(new FhirIssue(ReportErrorCodes.InvalidParameter, $"{name} is given more than once.", name));
            return null;
        }

        return values.Count == 1 ? values[0] : null;
    }

    private static DateOnly Date(IQueryCollection query, string name, DateOnly fallback, List<FhirIssue> issues)
    {
        if (Single(query, name, issues) is not { } text)
        {
            return fallback;
        }

        if (DateOnly.TryParseExact(text, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var date))
        {
            return date;
        }

        issues.Add(new FhirIssue(ReportErrorCodes.InvalidParameter, $"{name} must be a full date (yyyy-MM-dd).", name));
        return fallback;
    }
}
