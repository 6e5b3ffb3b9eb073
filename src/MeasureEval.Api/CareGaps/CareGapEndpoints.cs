using System.Security.Claims;
using Hl7.Fhir.Model;
using MeasureEval.Api.Audit;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Ingest;
using MeasureEval.Api.Jobs;
using MeasureEval.Core.Security;
using MeasureEval.Engine.Gaps;
using MeasureEval.Engine.Reports;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.CareGaps;

/// <summary>$care-gaps (DEQM parameters, a Parameters resource with one Bundle per patient) and its streamed CSV/NDJSON export.</summary>
public static class CareGapEndpoints
{
    public const string CsvType = "text/csv; charset=utf-8";
    public const string NdjsonType = "application/x-ndjson";
    private const string CareGapsDefinition = "http://hl7.org/fhir/us/davinci-deqm/OperationDefinition/care-gaps";

    public static IEndpointRouteBuilder MapCareGapEndpoints(this IEndpointRouteBuilder app)
    {
        var group = app.MapGroup("").WithTags("Care gaps");
        var parameters = "periodStart, periodEnd, subject Patient/x or Group/x, practitioner Practitioner/x (panel), organization Organization/x (payer), status (repeated; default open-gap), measureId (repeated; default all), horizon (date; default the end of the next period)";
        group.MapGet("/Measure/$care-gaps", GetCareGapsAsync).WithName("care-gaps-get").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Gaps in care per patient: a Parameters with one Bundle (MeasureReports, DetectedIssues) per patient")
            .WithFhir([], [200, 202], 400, 404, 406)
            .WithFhirOperation("care-gaps", CareGapsDefinition, "Measure", parameters);
        group.MapPost("/Measure/$care-gaps", PostCareGapsAsync).WithName("care-gaps-post").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Gaps in care with a Parameters body")
            .WithFhir(FhirEndpointExtensions.ResourceMediaTypes, [200, 202], 400, 404, 406, 413, 415);
        group.MapGet("/Measure/$care-gaps-export", ExportAsync).WithName("care-gaps-export").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary($"One row per patient and measure, streamed as CSV or NDJSON (_format=csv|ndjson); {parameters}");
        return app;
    }

    public static async Task<FhirResult> GetCareGapsAsync(HttpRequest request, ClaimsPrincipal user, CareGapService service, MeasureReportBuilder reports, TimeProvider time, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        var issues = new List<FhirIssue>();
        if (!CareGapQuery.TryRead(request.Query, time, export: false, issues, out var query))
        {
            return FhirResult.Outcome(issues);
        }

        return AsyncRequests.Wanted(request)
            ? await AsyncRequests.StartAsync(request, JobKinds.CareGaps, CareGapJobParameters.From(query!, FhirFormat.Of(request.HttpContext)), cancellationToken)
            : await CareGapsAsync(query!, CallerScope.Of(user), service, reports, time, cancellationToken);
    }

    public static async Task<FhirResult> PostCareGapsAsync(
        HttpRequest request, ClaimsPrincipal user, CareGapService service, MeasureReportBuilder reports, TimeProvider time, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(options);
        var (body, refusal) = await FhirRequestBody.ReadResourceAsync<Parameters>(request, options.Value, cancellationToken);
        if (body is null)
        {
            return refusal!;
        }

        var issues = new List<FhirIssue>();
        if (!CareGapQuery.TryRead(body, time, issues, out var query))
        {
            return FhirResult.Outcome(issues);
        }

        return AsyncRequests.Wanted(request)
            ? await AsyncRequests.StartAsync(request, JobKinds.CareGaps, CareGapJobParameters.From(query!, FhirFormat.Of(request.HttpContext)), cancellationToken)
            : await CareGapsAsync(query!, CallerScope.Of(user), service, reports, time, cancellationToken);
    }

    public static async Task<Results<PushStreamHttpResult, FhirResult>> ExportAsync(HttpRequest request, ClaimsPrincipal user, CareGapService service, TimeProvider time, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(service);
        var issues = new List<FhirIssue>();
        if (!CareGapQuery.TryRead(request.Query, time, export: true, issues, out var query))
        {
            return FhirResult.Outcome(issues);
        }

        if (AsyncRequests.Wanted(request))
        {
            return await AsyncRequests.StartAsync(request, JobKinds.CareGapsExport, CareGapJobParameters.From(query!, FhirFormat.Of(request.HttpContext)), cancellationToken);
        }

        var (selection, problems) = await service.SelectAsync(query!, CallerScope.Of(user), cancellationToken);
        if (selection is null)
        {
            return FhirResult.Outcome(problems);
        }

        var csv = query!.Format == ExportFormat.Csv;
        var trail = AuditTrail.Of(request.HttpContext);
        trail?.Streamed = true;
        return TypedResults.Stream(
            body => WriteExportAsync(body, service, selection, query, progress: null, trail, cancellationToken),
            ExportContentType(query.Format),
            csv ? "care-gaps.csv" : "care-gaps.ndjson");
    }

    internal static string ExportContentType(ExportFormat format) => format == ExportFormat.Csv ? CsvType : NdjsonType;

    /// <summary>The export rows of a resolved request, written to <paramref name="body"/> as they are found; <paramref name="trail"/> learns the patients written.</summary>
    internal static async System.Threading.Tasks.Task WriteExportAsync(
        Stream body, CareGapService service, CareGapSelection selection, CareGapQuery query, IProgress<Engine.EvaluationProgress>? progress, AuditTrail? trail,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(service);
        ArgumentNullException.ThrowIfNull(query);
        await using var writer = new CareGapExportWriter(body, query.Format);
        await writer.WriteHeaderAsync(cancellationToken);
        await foreach (var patient in service.StreamAsync(selection, query, progress, cancellationToken))
        {
            // A streamed answer names its patients as it writes them (the audit event is completed at the end).
            if (patient.Gaps.Count > 0)
            {
                trail?.AddPatient(patient.Facts.PatientId);
            }

            foreach (var (_, gap) in patient.Gaps)
            {
                await writer.WriteAsync(gap, cancellationToken);
            }
        }
    }

    private static Task<FhirResult> CareGapsAsync(CareGapQuery query, DataScope scope, CareGapService service, MeasureReportBuilder reports, TimeProvider time, CancellationToken cancellationToken) =>
        CareGapsAsync(query, scope, service, reports, time, progress: null, cancellationToken);

    /// <summary>$care-gaps for a parsed request: what the GET and POST handlers and an asynchronous job answer.</summary>
    internal static async Task<FhirResult> CareGapsAsync(
        CareGapQuery query, DataScope scope, CareGapService service, MeasureReportBuilder reports, TimeProvider time, IProgress<Engine.EvaluationProgress>? progress,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(service);
        var (selection, problems) = await service.SelectAsync(query, scope, cancellationToken);
        if (selection is null)
        {
            return FhirResult.Outcome(problems);
        }

        var builder = new CareGapBundleBuilder(reports, time);
        var result = new Parameters { Id = Guid.NewGuid().ToString() };
        await foreach (var patient in service.StreamAsync(selection, query, progress, cancellationToken))
        {
            result.Parameter.Add(new Parameters.ParameterComponent { Name = "return", Resource = builder.Build(patient.Facts.PatientId, patient.Gaps) });
        }

        return FhirResult.Of(200, result);
    }
}
