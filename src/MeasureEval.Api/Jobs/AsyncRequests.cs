using System.Text.Json;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Jobs;

/// <summary>
/// Kick-off of the FHIR asynchronous request pattern (R4 async.html, RFC 7240 <c>Prefer: respond-async</c>): a handler
/// that has parsed its parameters hands them here instead of running the operation, and answers 202 Accepted with
/// Content-Location naming the job's status URL.
/// </summary>
public static class AsyncRequests
{
    /// <summary>True when the request carries the preference <c>respond-async</c> (RFC 7240: comma-separated, case-insensitive tokens).</summary>
    public static bool Wanted(HttpRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        return request.Headers["Prefer"]
            .SelectMany(v => (v ?? "").Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries))
            .Any(token => token.Split(';', 2)[0].Trim().Equals("respond-async", StringComparison.OrdinalIgnoreCase));
    }

    /// <summary>Stores the job (kind, parameters, the caller's claims), wakes the worker and answers 202.</summary>
    public static async Task<FhirResult> StartAsync<T>(HttpRequest request, string kind, T parameters, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        var services = request.HttpContext.RequestServices;
        var time = services.GetRequiredService<TimeProvider>();
        var id = Guid.CreateVersion7(time.GetUtcNow()).ToString("N");
        // Refused now, as the synchronous request would be, if the caller has no data scope.
        _ = Security.CallerScope.Of(request.HttpContext.User);
        var caller = JobCaller.Of(request.HttpContext.User);
        await services.GetRequiredService<IJobStore>().CreateAsync(id, kind, JsonSerializer.Serialize(parameters, JobKinds.Json), caller.ToJson(), cancellationToken);
        services.GetRequiredService<JobWorker>().Wake();
        var location = StatusUrl(request, id);
        return FhirResult.Outcome(202, [new FhirIssue(JobErrors.Accepted, $"{kind} accepted as job {id}; poll {location} (202 while it runs, then the result)")])
            .WithHeader("Content-Location", location);
    }

    public static string StatusUrl(HttpRequest request, string id) => $"{FhirBaseUrl.Of(request)}/jobs/{id}";
}
