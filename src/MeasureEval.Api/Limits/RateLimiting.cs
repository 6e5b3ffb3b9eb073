using System.Globalization;
using System.Threading.RateLimiting;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.RateLimiting;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Limits;

/// <summary>
/// Per-client request rate: one fixed one-minute window per token subject (an unauthenticated caller by its remote
/// address), no queueing; the public endpoints (<c>/metadata</c>, health) are exempt, so load balancer probes and
/// capability discovery never compete with work. Rejected: 429 with Retry-After and an OperationOutcome.
/// </summary>
public static class RateLimiting
{
    public static IServiceCollection AddMeasureEvalRateLimiting(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddRateLimiter(_ => { });
        services.AddOptions<RateLimiterOptions>().Configure<IOptions<LimitsOptions>>((options, limits) =>
        {
            var permits = limits.Value.RequestsPerMinute;
            options.GlobalLimiter = PartitionedRateLimiter.Create<HttpContext, string>(context =>
                context.GetEndpoint()?.Metadata.GetMetadata<IAllowAnonymous>() is not null
                    ? RateLimitPartition.GetNoLimiter("public")
                    : RateLimitPartition.GetFixedWindowLimiter(PartitionOf(context), _ => new FixedWindowRateLimiterOptions
                    {
                        PermitLimit = permits,
                        Window = TimeSpan.FromMinutes(1),
                        QueueLimit = 0,
                        AutoReplenishment = true,
                    }));
            options.OnRejected = OnRejectedAsync;
        });
        return services;
    }

    /// <summary>The client a request counts against: its token subject, otherwise its remote address.</summary>
    public static string PartitionOf(HttpContext context)
    {
        ArgumentNullException.ThrowIfNull(context);
        var sub = context.User.Identity?.IsAuthenticated == true ? context.User.FindFirst("sub")?.Value : null;
        return sub is not null ? "sub:" + sub : "ip:" + (context.Connection.RemoteIpAddress?.ToString() ?? "unknown");
    }

    private static async ValueTask OnRejectedAsync(OnRejectedContext context, CancellationToken cancellationToken)
    {
        var http = context.HttpContext;
        var seconds = context.Lease.TryGetMetadata(MetadataName.RetryAfter, out var retryAfter) ? Math.Max(1, (int)Math.Ceiling(retryAfter.TotalSeconds)) : 60;
        http.Response.Headers.RetryAfter = seconds.ToString(CultureInfo.InvariantCulture);
        var issue = new FhirIssue(ErrorCatalogue.TooManyRequests, $"This client has used its requests for this minute (Limits:RequestsPerMinute); retry after {seconds} s.");
        await FhirResult.Outcome(issue.Code.HttpStatus, [issue]).ExecuteAsync(http);
    }
}
