using MeasureEval.Api.Audit;
using MeasureEval.Api.Bundles;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Health;
using MeasureEval.Api.Ingest;
using MeasureEval.Api.Limits;
using MeasureEval.Api.OpenApi;
using MeasureEval.Api.Search;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;

namespace MeasureEval.Api.Hosting;

public static class ApiServiceCollectionExtensions
{
    /// <summary>Everything the HTTP API needs except storage (<c>AddMeasureEvalStorage</c>) and logging.</summary>
    public static IServiceCollection AddMeasureEvalApi(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddOptions<IngestOptions>().BindConfiguration(IngestOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<SearchOptions>().BindConfiguration(SearchOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<LimitsOptions>().BindConfiguration(LimitsOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.TryAddSingleton(TimeProvider.System);
        services.AddSingleton<AuditRecorder>();
        services.AddMeasureEvalRateLimiting();
        // One year (common practice; the ASP.NET Core default is 30 days). Loopback hosts are left out by the middleware.
        services.AddHsts(o => o.MaxAge = TimeSpan.FromDays(365));
        services.AddSingleton<SearchService>();
        services.AddSingleton<BundlePlanner>();
        services.AddSingleton<BundleProcessor>();
        services.AddSingleton<IngestProcessor>();
        services.AddSingleton<CapabilityStatementBuilder>();
        services.AddHostedService<FhirWarmup>();
        services.AddExceptionHandler<FhirExceptionHandler>();
        services.AddProblemDetails();
        services.AddHealthChecks().AddCheck<StoreReadyHealthCheck>("store", tags: [HealthEndpoints.ReadyTag]);
        services.AddMeasureEvalOpenApi();
        return services;
    }
}
