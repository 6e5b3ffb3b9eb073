using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Measures;

public static class MeasureServiceCollectionExtensions
{
    /// <summary>The measure catalog (checked-in and user-loaded definitions) and $evaluate-measure.</summary>
    public static IServiceCollection AddMeasureEvalMeasures(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddOptions<MeasureCatalogOptions>().BindConfiguration(MeasureCatalogOptions.Section)
            .Validate(o => !string.IsNullOrWhiteSpace(o.Directory), "Measures:Directory must name a directory").ValidateOnStart();
        services.AddOptions<EvaluationOptions>().BindConfiguration(EvaluationOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddSingleton<MeasureCatalog>();
        services.AddSingleton<MeasureEvaluationService>();
        return services;
    }
}
