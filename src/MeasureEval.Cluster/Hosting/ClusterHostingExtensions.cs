using System.Net;
using MeasureEval.Cluster.Partitions;
using MeasureEval.Cluster.Placement;
using MeasureEval.Engine;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Orleans.Configuration;
using Orleans.Hosting;

namespace MeasureEval.Cluster.Hosting;

public static class ClusterHostingExtensions
{
    /// <summary>
    /// Cluster mode when <c>Cluster:Enabled</c> is true: this node becomes an Orleans silo with Redis membership.
    /// Otherwise only the (disabled) options are bound and nothing of Orleans is registered or started.
    /// </summary>
    public static IHostApplicationBuilder AddMeasureEvalCluster(
        this IHostApplicationBuilder builder, Func<IServiceProvider, CancellationToken, System.Threading.Tasks.Task<MeasureRepository>> measures)
    {
        ArgumentNullException.ThrowIfNull(builder);
        builder.Services.AddOptions<MeasureClusterOptions>().BindConfiguration(MeasureClusterOptions.Section)
            .Validate(o => !o.Enabled || !string.IsNullOrWhiteSpace(o.RedisConnectionString), "Cluster:RedisConnectionString is required when Cluster:Enabled")
            .Validate(o => o.Partitions is > 0 and <= 4096, "Cluster:Partitions must be 1..4096")
            .Validate(o => o.PartitionAttempts > 0, "Cluster:PartitionAttempts must be positive")
            .Validate(o => o.PartitionStartDelay >= TimeSpan.Zero, "Cluster:PartitionStartDelay must not be negative")
            .ValidateOnStart();
        var options = builder.Configuration.GetSection(MeasureClusterOptions.Section).Get<MeasureClusterOptions>() ?? new MeasureClusterOptions();
        if (!options.Enabled)
        {
            return builder;
        }

        builder.Services.AddSingleton(sp => new ClusterMeasureSource(sp, measures));
        builder.Services.AddSingleton<EvaluationScheduler>();
        builder.Services.AddSingleton<ClusterEvaluation>();
        builder.UseOrleans(silo =>
        {
            silo.Configure<ClusterOptions>(o =>
            {
                o.ClusterId = options.ClusterId;
                o.ServiceId = options.ServiceId;
            });
            silo.UseRedisClustering(options.RedisConnectionString);
            silo.Configure<EndpointOptions>(o =>
            {
                o.AdvertisedIPAddress = options.AdvertisedAddress is { } address ? IPAddress.Parse(address) : IPAddress.Loopback;
                o.SiloPort = options.SiloPort;
                o.GatewayPort = 0;
            });
            silo.Configure<ClusterMembershipOptions>(o =>
            {
                o.ProbeTimeout = options.ProbeTimeout;
                o.NumMissedProbesLimit = options.MissedProbesLimit;
                o.NumVotesForDeathDeclaration = options.VotesForDeathDeclaration;
                o.TableRefreshTimeout = options.TableRefreshTimeout;
            });
            silo.Configure<SiloMessagingOptions>(o => o.ResponseTimeout = options.PartitionTimeout);
            silo.Services.AddPlacementDirector<PartitionSpreadPlacement, PartitionSpreadPlacementDirector>();
        });
        return builder;
    }
}
