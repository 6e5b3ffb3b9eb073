using System.IO.Compression;
using System.Security.Claims;
using System.Text.Json;
using MeasureEval.Api.CareGaps;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Measures;
using MeasureEval.Api.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine.Reports;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Jobs;

/// <summary>
/// Runs one job by calling what the synchronous handler calls after parsing (<see cref="MeasureEndpoints"/>,
/// <see cref="CareGapEndpoints"/>), and renders the answer the synchronous request would have had: status, content
/// type and body (gzip-compressed for the job table).
/// </summary>
public sealed class JobRunner(
    IServiceProvider services, MeasureCatalog catalog, MeasureEvaluationService evaluation, CareGapService gaps, MeasureReportBuilder reports, TimeProvider time)
{
    public async Task<JobResult> RunAsync(JobRecord job, ClaimsPrincipal caller, IProgress<Engine.EvaluationProgress> progress, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(job);
        // The scope of the caller who started the job, rebuilt from the stored claims (a payer sees its members only).
        var scope = CallerScope.Of(caller);
        switch (job.Kind)
        {
            case JobKinds.EvaluateMeasure:
            {
                var p = Read<EvaluateJobParameters>(job);
                var result = p.MeasureId is { } id
                    ? await MeasureEndpoints.EvaluateOneAsync(id, p.ToParameters(), scope, catalog, evaluation, progress, cancellationToken)
                    : await MeasureEndpoints.EvaluateMeasuresAsync(p.ToParameters(), scope, catalog, evaluation, progress, cancellationToken);
                return await RenderAsync(result, new FhirFormat(p.MediaType, p.Pretty), caller);
            }

            case JobKinds.CareGaps:
            {
                var p = Read<CareGapJobParameters>(job);
                var result = await CareGapEndpoints.CareGapsAsync(p.ToQuery(), scope, gaps, reports, time, progress, cancellationToken);
                return await RenderAsync(result, new FhirFormat(p.MediaType, p.Pretty), caller);
            }

            case JobKinds.CareGapsExport:
            {
                var p = Read<CareGapJobParameters>(job);
                var query = p.ToQuery();
                var (selection, problems) = await gaps.SelectAsync(query, scope, cancellationToken);
                if (selection is null)
                {
                    return await RenderAsync(FhirResult.Outcome(problems), new FhirFormat(p.MediaType, p.Pretty), caller);
                }

                // Compressed as it is written: the job holds the gzip bytes only (a CSV export compresses about tenfold).
                using var compressed = new MemoryStream();
                await using (var gzip = new GZipStream(compressed, CompressionLevel.Fastest, leaveOpen: true))
                {
                    await CareGapEndpoints.WriteExportAsync(gzip, gaps, selection, query, progress, cancellationToken);
                }

                return new JobResult(200, CareGapEndpoints.ExportContentType(query.Format), compressed.ToArray());
            }

            default:
                throw new InvalidOperationException($"unknown job kind '{job.Kind}'");
        }
    }

    /// <summary>Writes a FHIR answer as the synchronous request would have, into gzip bytes.</summary>
    public async Task<JobResult> RenderAsync(FhirResult result, FhirFormat format, ClaimsPrincipal caller)
    {
        ArgumentNullException.ThrowIfNull(result);
        ArgumentNullException.ThrowIfNull(format);
        var context = new DefaultHttpContext { RequestServices = services, User = caller };
        format.StoreIn(context);
        using var compressed = new MemoryStream();
        await using (var gzip = new GZipStream(compressed, CompressionLevel.Fastest, leaveOpen: true))
        {
            context.Response.Body = gzip;
            await result.ExecuteAsync(context);
            await context.Response.BodyWriter.CompleteAsync();
        }

        return new JobResult(context.Response.StatusCode, context.Response.ContentType ?? FhirFormat.FhirJson + "; charset=utf-8", compressed.ToArray());
    }

    private static T Read<T>(JobRecord job) =>
        JsonSerializer.Deserialize<T>(job.Parameters, JobKinds.Json) ?? throw new JsonException($"job {job.Id} has no parameters");
}
