using MeasureEval.Core.Storage;
using Microsoft.Extensions.Diagnostics.HealthChecks;

namespace MeasureEval.Api.Health;

/// <summary>Ready when the store answers a trivial query.</summary>
public sealed class StoreReadyHealthCheck(IResourceStore store) : IHealthCheck
{
    public async Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken cancellationToken = default) =>
        await store.IsReadyAsync(cancellationToken) ? HealthCheckResult.Healthy("store ready") : HealthCheckResult.Unhealthy("store not ready");
}
