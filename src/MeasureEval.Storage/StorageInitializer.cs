using MeasureEval.Core.Storage;
using Microsoft.Extensions.Hosting;

namespace MeasureEval.Storage;

/// <summary>Creates or migrates the schema when the host starts, so the first request finds a ready store.</summary>
public sealed class StorageInitializer(IResourceStore store) : IHostedService
{
    public System.Threading.Tasks.Task StartAsync(CancellationToken cancellationToken) => store.InitializeAsync(cancellationToken);

    public System.Threading.Tasks.Task StopAsync(CancellationToken cancellationToken) => System.Threading.Tasks.Task.CompletedTask;
}
