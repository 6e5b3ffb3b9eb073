using System.Security.Claims;
using System.Text;
using System.Globalization;
using MeasureEval.Analytics.Population;
using MeasureEval.Analytics.Reports;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Engine;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Routing;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Analytics;

/// <summary>
/// Report pages for quality analysts: an index of every measure's rate and one measure's report (HTML, JSON or CSV),
/// linking to the care-gap export for the patients behind each open gap. Bad parameters come back as an OperationOutcome naming each one.
/// </summary>
public static class ReportEndpoints
{
    public const string HtmlType = "text/html; charset=utf-8";
    public const string CsvType = "text/csv; charset=utf-8";
    public const string JsonType = "application/json; charset=utf-8";

    public static IEndpointRouteBuilder MapReportEndpoints(this IEndpointRouteBuilder app)
    {
        ArgumentNullException.ThrowIfNull(app);
        var group = app.MapGroup("/reports").WithTags("Reports");
        group.MapGet("/", GetIndexAsync).WithName("GetReportIndex").RequireAuthorization(AccessPolicies.PatientData).WithSummary("Every measure's rate with its 95 % interval over one period (HTML or JSON).");
        group.MapGet("/measures/{id}", GetMeasureReportAsync).WithName("GetMeasureReport").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("One measure: rate and strata with intervals, panel funnel and gap-to-target, trend (HTML, JSON or CSV).");
        return app;
    }

    public static async Task<Results<ContentHttpResult, FhirResult>> GetIndexAsync(
        HttpRequest request, ClaimsPrincipal user, MeasureAnalytics analytics, TimeProvider time, CancellationToken cancellationToken)
    {
        if (!ReportQuery.TryParse(request.Query, time, out var query, out var issues) || query.Format == ReportOutput.Csv)
        {
            return FhirResult.Outcome(issues.Count > 0 ? issues : [new FhirIssue(ReportErrorCodes.InvalidParameter, "the index is served as html or json.", "format")]);
        }

        var summaries = await analytics.SummariesAsync(query.Period, CallerScope.Of(user), cancellationToken).ConfigureAwait(false);
        return query.Format == ReportOutput.Json
            ? TypedResults.Content(ReportJson.Serialize(summaries), JsonType)
            : TypedResults.Content(ReportIndexPage.Render(query.Period, summaries, id => $"/reports/measures/{Uri.EscapeDataString(id)}{query.ToQueryString()}"), HtmlType);
    }

    public static async Task<Results<ContentHttpResult, FhirResult>> GetMeasureReportAsync(
        string id, HttpRequest request, ClaimsPrincipal user, MeasureAnalytics analytics, TimeProvider time, CancellationToken cancellationToken)
    {
        if (!TryPrepare(id, request, analytics, time, out var measure, out var query, out var failure))
        {
            return failure;
        }

        var report = await analytics.ReportAsync(measure, query.Period, query.Target, query.Interval, CallerScope.Of(user), cancellationToken).ConfigureAwait(false);
        switch (query.Format)
        {
            case ReportOutput.Json:
                return TypedResults.Content(ReportJson.Serialize(report), JsonType);
            case ReportOutput.Csv:
                request.HttpContext.Response.Headers.ContentDisposition = $"attachment; filename=\"{measure.Id}-{query.Period.Start:yyyyMMdd}-{query.Period.End:yyyyMMdd}.csv\"";
                return TypedResults.Content(ReportCsv.Write(report), CsvType);
            default:
                var self = $"/reports/measures/{Uri.EscapeDataString(measure.Id)}";
                var links = new ReportLinks(
                    $"/reports{query.ToQueryString()}",
                    self + query.ToQueryString("json"),
                    self + query.ToQueryString("csv"),
                    panel => CareGapExportLink(measure.Id, query, panel));
                return TypedResults.Content(ReportPage.Render(report, links), HtmlType);
        }
    }

    /// <summary>
    /// The care-gap export (the care-gaps endpoints) of one measure's open gaps, for one panel or — for null — everyone.
    /// A panel stratum code is the Practitioner reference itself.
    /// </summary>
    public static string CareGapExportLink(string measureId, ReportQuery query, string? panel)
    {
        ArgumentNullException.ThrowIfNull(query);
        var link = new StringBuilder("/Measure/$care-gaps-export?periodStart=")
            .Append(query.Period.Start.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture))
            .Append("&periodEnd=").Append(query.Period.End.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture))
            .Append("&measureId=").Append(Uri.EscapeDataString(measureId))
            .Append("&status=open-gap");
        if (panel is not null)
        {
            link.Append("&practitioner=").Append(Uri.EscapeDataString(panel));
        }

        return link.Append("&_format=csv").ToString();
    }

    private static bool TryPrepare(
        string id, HttpRequest request, MeasureAnalytics analytics, TimeProvider time,
        [System.Diagnostics.CodeAnalysis.NotNullWhen(true)] out MeasureDefinition? measure,
        out ReportQuery query, [System.Diagnostics.CodeAnalysis.NotNullWhen(false)] out FhirResult? failure)
    {
        var parsed = ReportQuery.TryParse(request.Query, time, out query, out var issues);
        var all = new List<FhirIssue>(issues);
        if (!analytics.Repository.TryGetMeasure(id, out measure))
        {
            all.Insert(0, new FhirIssue(ReportErrorCodes.UnknownMeasure, $"No measure '{id}' is defined; the index at /reports lists them."));
        }

        if (!parsed || measure is null)
        {
            failure = FhirResult.Outcome(all);
            measure = null;
            return false;
        }

        failure = null;
        return true;
    }
}
