using MeasureEval.Analytics.Population;
using MeasureEval.Engine;
using Microsoft.AspNetCore.Hosting;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Analytics;

public static class AnalyticsServiceCollectionExtensions
{
    /// <summary>
    /// The report pages and their data. The measure repository is added only if nothing else registered one
    /// (the engine's endpoints may); it fails the start when a definition has issues.
    /// </summary>
    public static IServiceCollection AddMeasureEvalAnalytics(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddOptions<AnalyticsOptions>().BindConfiguration(AnalyticsOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.TryAddSingleton(TimeProvider.System);
        services.TryAddSingleton(sp => LoadRepository(sp.GetRequiredService<IOptions<AnalyticsOptions>>().Value, sp.GetRequiredService<IWebHostEnvironment>()));
        services.AddSingleton<MeasureAnalytics>();
        return services;
    }

    private static MeasureRepository LoadRepository(AnalyticsOptions options, IWebHostEnvironment environment)
    {
        var directory = ResolveDirectory(options.Directory, environment.ContentRootPath);
        var repository = MeasureRepository.Load(directory, out var issues);
        if (issues.Count > 0)
        {
            var first = issues[0];
            throw new InvalidOperationException($"{issues.Count} issue(s) in the measure definitions under {directory}; first: {first.File} {first.Path}: {first.Message}");
        }

        return repository;
    }

    // A relative directory is looked for from the content root upwards, so that `dotnet run --project src/MeasureEval.Api`
    // finds the repository's measures/ as well as a published layout does.
    private static string ResolveDirectory(string configured, string contentRoot)
    {
        if (Path.IsPathRooted(configured))
        {
            return configured;
        }

        for (var dir = new DirectoryInfo(contentRoot); dir is not null; dir = dir.Parent)
        {
            var candidate = Path.Combine(dir.FullName, configured);
            if (Directory.Exists(candidate))
            {
                return candidate;
            }
        }

        return Path.Combine(contentRoot, configured);
    }
}
