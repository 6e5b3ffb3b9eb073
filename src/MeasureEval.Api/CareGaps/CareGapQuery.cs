using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Engine;
using MeasureEval.Engine.Gaps;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.CareGaps;

public enum ExportFormat
{
    Csv,
    Ndjson,
}

/// <summary>
/// The parameters of $care-gaps and its export, read from the query (GET) or a Parameters resource (POST): the DEQM
/// parameters periodStart, periodEnd, subject, practitioner, organization, status*, measureId*, and our horizon.
/// </summary>
public sealed record CareGapQuery(MeasurementPeriod Period, IReadOnlyList<string> MeasureIds, IReadOnlySet<GapStatus> Statuses)
{
    private static readonly string[] Known = ["periodStart", "periodEnd", "subject", "practitioner", "organization", "status", "measureId", "horizon", "_format", "_pretty"];

    /// <summary>"Patient" or "Group" with <see cref="SubjectId"/>, or null for every patient.</summary>
    public string? SubjectType { get; init; }

    public string? SubjectId { get; init; }

    /// <summary>Practitioner/x: patients whose first generalPractitioner it is (the primary-care panel).</summary>
    public string? Practitioner { get; init; }

    /// <summary>Organization/x: patients with a Coverage active during the period whose payor it is.</summary>
    public string? Organization { get; init; }

    /// <summary>Null: the end of the next period.</summary>
    public DateOnly? Horizon { get; init; }

    public ExportFormat Format { get; init; } = ExportFormat.Csv;

    public static bool TryRead(IQueryCollection query, TimeProvider time, bool export, List<FhirIssue> issues, out CareGapQuery? result)
    {
        ArgumentNullException.ThrowIfNull(query);
        var values = new List<(string Name, string Value, string Location)>();
        foreach (var (key, list) in query)
        {
            foreach (var value in list)
            {
                values.Add((key, value ?? "", key));
            }
        }

        return TryRead(values, time, export, issues, out result);
    }

    public static bool TryRead(Parameters body, TimeProvider time, List<FhirIssue> issues, out CareGapQuery? result)
    {
        var values = OperationParameters.Read(body, CareGapErrors.InvalidParameter, issues).Select(p => (p.Name, p.Value, p.Location)).ToList();
        return TryRead(values, time, export: false, issues, out result);
    }

    private static bool TryRead(List<(string Name, string Value, string Location)> values, TimeProvider time, bool export, List<FhirIssue> issues, out CareGapQuery? result)
    {
        result = null;
        var before = issues.Count;
        foreach (var (name, _, location) in values.Where(v => !Known.Contains(v.Name)).DistinctBy(v => v.Name))
        {
            issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"unknown parameter '{name}' (known: {string.Join(", ", Known.Take(8))})", location));
        }

        (string Value, string Location)? Single(string name)
        {
            var found = values.Where(v => v.Name == name).ToList();
            if (found.Count > 1)
            {
                issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"'{name}' may be given once", found[1].Location));
            }

            return found.Count == 0 ? null : (found[0].Value, found[0].Location);
        }

        var year = time.GetUtcNow().Year;
        var start = Date(Single("periodStart"), "periodStart", first: true, issues) ?? new DateOnly(year, 1, 1);
        var end = Date(Single("periodEnd"), "periodEnd", first: false, issues) ?? new DateOnly(year, 12, 31);
        if (end < start)
        {
            issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"periodEnd {end:yyyy-MM-dd} is before periodStart {start:yyyy-MM-dd}", "periodEnd"));
        }

        var horizon = Date(Single("horizon"), "horizon", first: false, issues);
        var subject = Reference(Single("subject"), "subject", ["Patient", "Group"], issues);
        var practitioner = Reference(Single("practitioner"), "practitioner", ["Practitioner"], issues);
        var organization = Reference(Single("organization"), "organization", ["Organization"], issues);
        var statuses = new HashSet<GapStatus>();
        foreach (var (_, value, location) in values.Where(v => v.Name == "status"))
        {
            // A comma-separated list is accepted as repeated values (FHIR search convention).
            foreach (var code in value.Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries))
            {
                if (GapStatuses.TryParse(code, out var status))
                {
                    statuses.Add(status);
                }
                else
                {
                    issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"status '{code}' is not one of {string.Join(", ", GapStatuses.All.Select(s => s.Code()))}", location));
                }
            }
        }

        var measureIds = values.Where(v => v.Name == "measureId")
            .SelectMany(v => v.Value.Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries))
            .Select(v => v.StartsWith("Measure/", StringComparison.Ordinal) ? v["Measure/".Length..] : v)
            .Distinct(StringComparer.Ordinal).ToList();
        var format = ExportFormat.Csv;
        if (export && Single("_format") is { } f)
        {
            if (f.Value is "csv" or "text/csv")
            {
                format = ExportFormat.Csv;
            }
            else if (f.Value is "ndjson" or "application/x-ndjson" or "application/fhir+ndjson")
            {
                format = ExportFormat.Ndjson;
            }
            else
            {
                issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"_format '{f.Value}' is not csv or ndjson", f.Location));
            }
        }

        if (issues.Count > before)
        {
            return false;
        }

        result = new CareGapQuery(new MeasurementPeriod(start, end), measureIds, statuses.Count == 0 ? new HashSet<GapStatus> { GapStatus.Open } : statuses)
        {
            SubjectType = subject?.Type,
            SubjectId = subject?.Id,
            Practitioner = practitioner is null ? null : $"{practitioner.Value.Type}/{practitioner.Value.Id}",
            Organization = organization is null ? null : $"{organization.Value.Type}/{organization.Value.Id}",
            Horizon = horizon,
            Format = format,
        };
        return true;
    }

    /// <summary>A date, or a dateTime taken on the date it states; a partial date stands for its first (start) or last (end) day.</summary>
    private static DateOnly? Date((string Value, string Location)? given, string name, bool first, List<FhirIssue> issues)
    {
        if (given is not { } g)
        {
            return null;
        }

        if (!StatedTime.TryParse(g.Value, out var stated))
        {
            issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"{name} '{g.Value}' is not a FHIR date (YYYY-MM-DD)", g.Location));
            return null;
        }

        return first ? stated.First : stated.Last;
    }

    private static (string Type, string Id)? Reference((string Value, string Location)? given, string name, string[] types, List<FhirIssue> issues)
    {
        if (given is not { } g)
        {
            return null;
        }

        var parts = g.Value.Split('/');
        if (parts.Length != 2 || !types.Contains(parts[0]) || !IsId(parts[1]))
        {
            issues.Add(new FhirIssue(CareGapErrors.InvalidParameter, $"{name} '{g.Value}' must be {string.Join(" or ", types.Select(t => t + "/<id>"))}", g.Location));
            return null;
        }

        return (parts[0], parts[1]);
    }

    private static bool IsId(string id) => id.Length is > 0 and <= 64 && id.All(c => char.IsAsciiLetterOrDigit(c) || c is '-' or '.');
}
