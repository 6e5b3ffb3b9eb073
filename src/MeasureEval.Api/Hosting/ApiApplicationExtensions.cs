using MeasureEval.Api.Audit;
using MeasureEval.Api.Bundles;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Health;
using MeasureEval.Api.Ingest;
using MeasureEval.Api.Limits;
using MeasureEval.Api.Logging;
using MeasureEval.Api.OpenApi;
using MeasureEval.Api.Resources;
using MeasureEval.Api.Search;
using MeasureEval.Api.Security;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Hosting;

namespace MeasureEval.Api.Hosting;

public static class ApiApplicationExtensions
{
    /// <summary>The middleware pipeline: correlation id, request log, FHIR errors for everything that fails, API docs.</summary>
    public static WebApplication UseMeasureEvalApi(this WebApplication app)
    {
        ArgumentNullException.ThrowIfNull(app);
        app.UseMiddleware<RequestIdMiddleware>();
        app.UseMiddleware<SecurityHeadersMiddleware>();
        if (!app.Environment.IsDevelopment())
        {
            // HSTS before the redirect, so browsers stop trying plain HTTP at all (sent on HTTPS answers only).
            app.UseHsts();
            app.UseHttpsRedirection();
        }

        app.UseMeasureEvalRequestLogging();
        app.UseExceptionHandler();
        app.UseFhirStatusCodeOutcomes();
        app.UseMeasureEvalOpenApi();
        // Routing after the docs middleware, so requests it serves are not matched (and logged) as FHIR routes.
        app.UseRouting();
        app.UseAuthentication();
        // After authentication (who) and before authorization, so refused requests (401, 403, 429) are audited too.
        app.UseMiddleware<AuditMiddleware>();
        app.UseRateLimiter();
        app.UseAuthorization();
        return app;
    }

    /// <summary>
    /// The group every route is mapped in: each audited request is recorded (<see cref="AuditEndpointFilter"/>) and
    /// synchronous evaluations run within their time budget (<see cref="EvaluationBudgetFilter"/>).
    /// </summary>
    public static RouteGroupBuilder MapMeasureEvalRoutes(this IEndpointRouteBuilder app) =>
        app.MapGroup("").AddEndpointFilter<AuditEndpointFilter>().AddEndpointFilter<EvaluationBudgetFilter>();

    /// <summary>All FHIR REST endpoints of the foundation (the engine maps its Measure endpoints beside them).</summary>
    public static IEndpointRouteBuilder MapMeasureEvalApi(this IEndpointRouteBuilder app)
    {
        app.MapHealthEndpoints();
        app.MapCapabilityEndpoints();
        app.MapBundleEndpoints();
        app.MapIngestEndpoints();
        app.MapSearchEndpoints();
        app.MapResourceEndpoints();
        app.MapAuditEventEndpoints();
        return app;
    }
}
