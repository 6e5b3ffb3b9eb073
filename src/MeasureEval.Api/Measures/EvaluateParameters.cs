using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Engine;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Measures;

public enum ReportKind
{
    Subject,
    SubjectList,
    Population,
}

/// <summary>The parameters of $evaluate-measure, read from the query (GET) or a Parameters resource (POST).</summary>
public sealed record EvaluateParameters(
    IReadOnlyList<string> MeasureIds, MeasurementPeriod Period, string? SubjectType, string? SubjectId, string? PractitionerReference, ReportKind ReportKind)
{
    private static readonly string[] Known = ["periodStart", "periodEnd", "subject", "practitioner", "reportType", "measureId", "measure", "_format", "_pretty"];

    public static bool TryRead(IQueryCollection query, TimeProvider time, List<FhirIssue> issues, out EvaluateParameters? parameters)
    {
        var values = new List<(string Name, string Value)>();
        foreach (var (key, list) in query)
        {
            foreach (var value in list)
            {
                values.Add((key, value ?? ""));
            }
        }

        return TryRead(values, time, issues, out parameters);
    }

    public static bool TryRead(Parameters body, TimeProvider time, List<FhirIssue> issues, out EvaluateParameters? parameters)
    {
        var values = OperationParameters.Read(body, MeasureErrors.InvalidParameter, issues).Select(p => (p.Name, p.Value)).ToList();
        return TryRead(values, time, issues, out parameters);
    }

    private static bool TryRead(List<(string Name, string Value)> values, TimeProvider time, List<FhirIssue> issues, out EvaluateParameters? parameters)
    {
        parameters = null;
        var before = issues.Count;
        foreach (var (name, _) in values.Where(v => !Known.Contains(v.Name)).DistinctBy(v => v.Name))
        {
            issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"unknown parameter '{name}' (known: periodStart, periodEnd, subject, practitioner, reportType, measureId)", name));
        }

        string? Single(string name)
        {
            var found = values.Where(v => v.Name == name).Select(v => v.Value).ToList();
            if (found.Count > 1)
            {
                issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"'{name}' may be given once", name));
            }

            return found.FirstOrDefault();
        }

        var year = time.GetUtcNow().Year;
        var start = Date(Single("periodStart"), "periodStart", first: true, issues) ?? new DateOnly(year, 1, 1);
        var end = Date(Single("periodEnd"), "periodEnd", first: false, issues) ?? new DateOnly(year, 12, 31);
        if (end < start)
        {
            issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"periodEnd {end:yyyy-MM-dd} is before periodStart {start:yyyy-MM-dd}", "periodEnd"));
        }

        string? subjectType = null;
        string? subjectId = null;
        if (Single("subject") is { } subject)
        {
            var parts = subject.Split('/');
            if (parts.Length != 2 || parts[0] is not ("Patient" or "Group") || !IsId(parts[1]))
            {
                issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"subject '{subject}' must be Patient/<id> or Group/<id>", "subject"));
            }
            else
            {
                subjectType = parts[0];
                subjectId = parts[1];
            }
        }

        string? practitioner = null;
        if (Single("practitioner") is { } p)
        {
            var parts = p.Split('/');
            if (parts.Length != 2 || parts[0] is not ("Practitioner" or "PractitionerRole" or "Organization") || !IsId(parts[1]))
            {
                issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"practitioner '{p}' must be Practitioner/<id> (also PractitionerRole/<id> or Organization/<id>)", "practitioner"));
            }
            else
            {
                practitioner = p;
            }
        }

        var kind = subjectType == "Patient" ? ReportKind.Subject : ReportKind.Population;
        if (Single("reportType") is { } reportType)
        {
            ReportKind? parsed = reportType switch
            {
                "subject" => ReportKind.Subject,
                "subject-list" => ReportKind.SubjectList,
                "population" => ReportKind.Population,
                _ => null,
            };
            if (parsed is null)
            {
                issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"reportType '{reportType}' is not one of subject, subject-list, population", "reportType"));
            }
            else if (parsed == ReportKind.Subject && subjectType != "Patient")
            {
                issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, "reportType 'subject' needs a subject Patient/<id>", "reportType"));
            }
            else
            {
                kind = parsed.Value;
            }
        }

        var measureIds = values.Where(v => v.Name is "measureId" or "measure").Select(v => v.Value.StartsWith("Measure/", StringComparison.Ordinal) ? v.Value["Measure/".Length..] : v.Value).ToList();
        if (issues.Count > before)
        {
            return false;
        }

        parameters = new EvaluateParameters(measureIds, new MeasurementPeriod(start, end), subjectType, subjectId, practitioner, kind);
        return true;
    }

    /// <summary>A date, or a dateTime taken on the date it states; a partial date stands for its first (start) or last (end) day.</summary>
    private static DateOnly? Date(string? text, string name, bool first, List<FhirIssue> issues)
    {
        if (text is null)
        {
            return null;
        }

        if (!StatedTime.TryParse(text, out var stated))
        {
            issues.Add(new FhirIssue(MeasureErrors.InvalidParameter, $"{name} '{text}' is not a FHIR date (YYYY-MM-DD)", name));
            return null;
        }

        return first ? stated.First : stated.Last;
    }

    private static bool IsId(string id) => id.Length is > 0 and <= 64 && id.All(c => char.IsAsciiLetterOrDigit(c) || c is '-' or '.');

    public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"{Period.Start:yyyy-MM-dd}..{Period.End:yyyy-MM-dd}");
}
