using MeasureEval.Engine.Reports;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;

namespace MeasureEval.Api.CareGaps;

public static class CareGapServiceCollectionExtensions
{
    /// <summary>$care-gaps and its export (needs the measure catalog of <c>AddMeasureEvalMeasures</c> and storage).</summary>
    public static IServiceCollection AddMeasureEvalCareGaps(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.TryAddSingleton(TimeProvider.System);
        services.TryAddSingleton(sp => new MeasureReportBuilder(sp.GetRequiredService<TimeProvider>()));
        services.AddSingleton<CareGapService>();
        return services;
    }
}
