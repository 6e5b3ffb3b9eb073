using System.Globalization;
using System.IO.Compression;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Security;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;
using Microsoft.Net.Http.Headers;

namespace MeasureEval.Api.Jobs;

/// <summary>
/// The status URL of the asynchronous request pattern (FHIR R4 async.html): GET polls (202 with X-Progress and
/// Retry-After while the job runs, then the operation's own answer), DELETE cancels (202; the URL then answers 404).
/// </summary>
public static class JobEndpoints
{
    public static IEndpointRouteBuilder MapJobEndpoints(this IEndpointRouteBuilder app)
    {
        var group = app.MapGroup("").WithTags("Asynchronous jobs");
        group.MapGet("/jobs/{id}", StatusAsync).WithName("job-status").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Status of an asynchronous request: 202 with X-Progress and Retry-After while it runs; then the answer the synchronous request would have given (status, content type, body); 404 when unknown, another caller's, or cancelled")
            .Produces(StatusCodes.Status200OK).Produces(StatusCodes.Status202Accepted).Produces(StatusCodes.Status404NotFound, contentType: FhirFormat.FhirJson);
        group.MapDelete("/jobs/{id}", CancelAsync).WithName("job-cancel").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Cancel an asynchronous request (202); its status URL answers 404 afterwards")
            .Produces(StatusCodes.Status202Accepted, contentType: FhirFormat.FhirJson).Produces(StatusCodes.Status404NotFound, contentType: FhirFormat.FhirJson);
        return app;
    }

    public static async Task<Results<StoredJobAnswer, FhirResult>> StatusAsync(
        string id, HttpContext context, IJobStore store, IOptions<AsyncJobOptions> options, TimeProvider time, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentNullException.ThrowIfNull(time);
        var job = await store.GetAsync(id, cancellationToken);
        if (job is null || !JobCaller.Parse(job.Claims).MayBeSeenBy(context.User))
        {
            return NotFound(id);
        }

        switch (job.State)
        {
            case JobState.Cancelled:
                return FhirResult.Outcome([new FhirIssue(JobErrors.Cancelled, $"job {id} was cancelled")]);
            case JobState.Queued or JobState.Running:
                return FhirResult.Empty(StatusCodes.Status202Accepted)
                    .WithHeader("X-Progress", Progress(job, time.GetUtcNow()))
                    .WithHeader(HeaderNames.RetryAfter, options.Value.RetryAfterSeconds.ToString(CultureInfo.InvariantCulture));
            default:
                // Finished: the answer is stored with the job; gone only if a cancellation raced this read. It is kept
                // Jobs:Retention after the job ended (then the id is unknown: MEV-JOB-001), which Expires tells.
                return await store.GetResultAsync(id, cancellationToken) is { } result
                    ? new StoredJobAnswer(result, job.Updated + options.Value.Retention)
                    : FhirResult.Outcome([new FhirIssue(JobErrors.Cancelled, $"job {id} was cancelled")]);
        }
    }

    public static async Task<FhirResult> CancelAsync(string id, HttpContext context, IJobStore store, JobWorker worker, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(worker);
        var job = await store.GetAsync(id, cancellationToken);
        if (job is null || !JobCaller.Parse(job.Claims).MayBeSeenBy(context.User))
        {
            return NotFound(id);
        }

        if (!await store.TryCancelAsync(id, cancellationToken))
        {
            return FhirResult.Outcome([new FhirIssue(JobErrors.Cancelled, $"job {id} was cancelled already")]);
        }

        worker.CancelLocal(id);
        return FhirResult.Outcome(StatusCodes.Status202Accepted, [new FhirIssue(JobErrors.CancelAccepted, $"job {id} is cancelled; a result, if any, is deleted")]);
    }

    /// <summary>
    /// "41,200 of 100,000 patients"; "queued" before a worker takes the job; "interrupted" while a job whose worker
    /// stopped (its lease ran out) waits for another worker.
    /// </summary>
    internal static string Progress(JobRecord job, DateTimeOffset now)
    {
        ArgumentNullException.ThrowIfNull(job);
        if (job.State == JobState.Queued)
        {
            return "queued";
        }

        if (job.LeaseUntil is not { } until || until <= now)
        {
            return $"interrupted; waiting to run again (attempt {job.Attempts + 1})";
        }

        if (job.Unit is null)
        {
            return "started";
        }

        return job.Total > 0
            ? string.Create(CultureInfo.InvariantCulture, $"{job.Done:N0} of {job.Total:N0} {job.Unit}")
            : string.Create(CultureInfo.InvariantCulture, $"{job.Done:N0} {job.Unit}");
    }

    private static FhirResult NotFound(string id) => FhirResult.Outcome([new FhirIssue(JobErrors.NotFound, $"no job '{id}' for this caller")]);
}

/// <summary>
/// A finished job's stored answer: its status and content type, the body sent compressed when the client accepts gzip,
/// and <c>Expires</c> (RFC 9111 §5.3, an HTTP-date) when it will be deleted.
/// </summary>
public sealed class StoredJobAnswer(JobResult result, DateTimeOffset expires) : IResult, IStatusCodeHttpResult
{
    public int? StatusCode => result.Status;

    public async Task ExecuteAsync(HttpContext httpContext)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        var response = httpContext.Response;
        response.StatusCode = result.Status;
        response.ContentType = result.ContentType;
        response.Headers.Expires = expires.ToString("R", CultureInfo.InvariantCulture);
        if (httpContext.Request.Headers.AcceptEncoding.Any(v => v is not null && v.Contains("gzip", StringComparison.OrdinalIgnoreCase)))
        {
            response.Headers.ContentEncoding = "gzip";
            response.ContentLength = result.GzipBody.Length;
            await response.Body.WriteAsync(result.GzipBody, httpContext.RequestAborted);
            return;
        }

        await using var body = new GZipStream(new MemoryStream(result.GzipBody, writable: false), CompressionMode.Decompress);
        await body.CopyToAsync(response.Body, httpContext.RequestAborted);
    }
}
