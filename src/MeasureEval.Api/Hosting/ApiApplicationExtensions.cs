using MeasureEval.Api.Bundles;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Health;
using MeasureEval.Api.Ingest;
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
            app.UseHttpsRedirection();
        }

        app.UseMeasureEvalRequestLogging();
        app.UseExceptionHandler();
        app.UseFhirStatusCodeOutcomes();
        app.UseMeasureEvalOpenApi();
        // Routing after the docs middleware, so requests it serves are not matched (and logged) as FHIR routes.
        app.UseRouting();
        app.UseAuthentication();
        app.UseAuthorization();
        return app;
    }

    /// <summary>All FHIR REST endpoints of the foundation (the engine maps its Measure endpoints beside them).</summary>
    public static IEndpointRouteBuilder MapMeasureEvalApi(this IEndpointRouteBuilder app)
    {
        app.MapHealthEndpoints();
        app.MapCapabilityEndpoints();
        app.MapBundleEndpoints();
        app.MapIngestEndpoints();
        app.MapSearchEndpoints();
        app.MapResourceEndpoints();
        return app;
    }
}
