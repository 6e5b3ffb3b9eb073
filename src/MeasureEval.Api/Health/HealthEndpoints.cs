using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Diagnostics.HealthChecks;
using Microsoft.AspNetCore.Routing;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Health;

public static class HealthEndpoints
{
    public const string ReadyTag = "ready";

    /// <summary><c>/health/live</c>: the process answers. <c>/health/ready</c>: the store answers too.</summary>
    public static IEndpointRouteBuilder MapHealthEndpoints(this IEndpointRouteBuilder app)
    {
        app.MapHealthChecks("/health/live", new HealthCheckOptions { Predicate = _ => false }).WithTags("Health").AllowAnonymous();
        app.MapHealthChecks("/health/ready", new HealthCheckOptions { Predicate = check => check.Tags.Contains(ReadyTag) }).WithTags("Health").AllowAnonymous();
        return app;
    }
}
