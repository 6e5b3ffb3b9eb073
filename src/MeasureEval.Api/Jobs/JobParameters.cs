using System.Text.Json;
using System.Text.Json.Serialization;
using MeasureEval.Api.CareGaps;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Measures;
using MeasureEval.Engine;
using MeasureEval.Engine.Gaps;

namespace MeasureEval.Api.Jobs;

/// <summary>The kinds of job: each is one synchronous operation, run later with its parameters as parsed at kick-off.</summary>
public static class JobKinds
{
    /// <summary>GET/POST /Measure/{id}/$evaluate-measure (a MeasureReport) and POST /Measure/$evaluate-measure (a Bundle).</summary>
    public const string EvaluateMeasure = "evaluate-measure";

    /// <summary>GET/POST /Measure/$care-gaps (Parameters).</summary>
    public const string CareGaps = "care-gaps";

    /// <summary>GET /Measure/$care-gaps-export (CSV or NDJSON).</summary>
    public const string CareGapsExport = "care-gaps-export";

    internal static readonly JsonSerializerOptions Json = new() { Converters = { new JsonStringEnumConverter() } };
}

/// <summary>
/// $evaluate-measure as parsed at kick-off, with the negotiated response format. The period is stored resolved: a job
/// started on 31 December and run after a restart on 1 January still evaluates the year it was asked for.
/// </summary>
/// <param name="MeasureId">The instance-level measure (answer: one MeasureReport), or null for the type level (a Bundle of <paramref name="MeasureIds"/>).</param>
public sealed record EvaluateJobParameters(
    string? MeasureId, IReadOnlyList<string> MeasureIds, DateOnly PeriodStart, DateOnly PeriodEnd, string? SubjectType, string? SubjectId,
    string? Practitioner, ReportKind ReportKind, string MediaType, bool Pretty)
{
    public static EvaluateJobParameters From(string? measureId, EvaluateParameters parameters, FhirFormat format)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(format);
        return new EvaluateJobParameters(
            measureId, parameters.MeasureIds, parameters.Period.Start, parameters.Period.End, parameters.SubjectType, parameters.SubjectId,
            parameters.PractitionerReference, parameters.ReportKind, format.MediaType, format.Pretty);
    }

    public EvaluateParameters ToParameters() =>
        new(MeasureIds, new MeasurementPeriod(PeriodStart, PeriodEnd), SubjectType, SubjectId, Practitioner, ReportKind);
}

/// <summary>$care-gaps or its export as parsed at kick-off (statuses as DEQM codes), with the negotiated response format.</summary>
public sealed record CareGapJobParameters(
    DateOnly PeriodStart, DateOnly PeriodEnd, IReadOnlyList<string> MeasureIds, IReadOnlyList<string> Statuses, string? SubjectType, string? SubjectId,
    string? Practitioner, string? Organization, DateOnly? Horizon, ExportFormat Format, string MediaType, bool Pretty)
{
    public static CareGapJobParameters From(CareGapQuery query, FhirFormat format)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentNullException.ThrowIfNull(format);
        return new CareGapJobParameters(
            query.Period.Start, query.Period.End, query.MeasureIds, [.. query.Statuses.Select(s => s.Code()).Order(StringComparer.Ordinal)], query.SubjectType,
            query.SubjectId, query.Practitioner, query.Organization, query.Horizon, query.Format, format.MediaType, format.Pretty);
    }

    public CareGapQuery ToQuery()
    {
        var statuses = new HashSet<GapStatus>();
        foreach (var code in Statuses)
        {
            statuses.Add(GapStatuses.TryParse(code, out var status) ? status : throw new JsonException($"a stored job names gap status '{code}'"));
        }

        return new CareGapQuery(new MeasurementPeriod(PeriodStart, PeriodEnd), MeasureIds, statuses)
        {
            SubjectType = SubjectType,
            SubjectId = SubjectId,
            Practitioner = Practitioner,
            Organization = Organization,
            Horizon = Horizon,
            Format = Format,
        };
    }
}
