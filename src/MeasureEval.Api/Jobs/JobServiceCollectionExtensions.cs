using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Jobs;

public static class JobServiceCollectionExtensions
{
    /// <summary>Asynchronous requests: the runner and the background worker (needs storage, measures and care gaps).</summary>
    public static IServiceCollection AddMeasureEvalJobs(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddOptions<AsyncJobOptions>().BindConfiguration(AsyncJobOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddSingleton<JobRunner>();
        services.AddSingleton<JobWorker>();
        services.AddHostedService(sp => sp.GetRequiredService<JobWorker>());
        return services;
    }
}
