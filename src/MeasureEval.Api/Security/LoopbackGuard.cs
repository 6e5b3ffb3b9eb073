using System.Net;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Security;

/// <summary>Refuses to run with auth switched off on any address other than loopback (checked once the server has bound).</summary>
public sealed class LoopbackGuard(IServer server, IOptions<AuthOptions> options) : IHostedLifecycleService
{
    public Task StartedAsync(CancellationToken cancellationToken)
    {
        if (!options.Value.Disabled)
        {
            return Task.CompletedTask;
        }

        var addresses = server.Features.Get<IServerAddressesFeature>()?.Addresses ?? [];
        var exposed = addresses.Where(a => !IsLoopback(a)).ToList();
        if (exposed.Count > 0)
        {
            throw new InvalidOperationException($"Auth:Disabled=true is only allowed on loopback addresses; bound to {string.Join(", ", exposed)}.");
        }

        return Task.CompletedTask;
    }

    internal static bool IsLoopback(string address)
    {
        if (!Uri.TryCreate(address.Replace("://+", "://0.0.0.0", StringComparison.Ordinal).Replace("://*", "://0.0.0.0", StringComparison.Ordinal), UriKind.Absolute, out var uri))
        {
            return false;
        }

        return uri.IsLoopback || (IPAddress.TryParse(uri.Host.Trim('[', ']'), out var ip) && IPAddress.IsLoopback(ip));
    }

    public Task StartAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StartingAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppingAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppedAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
