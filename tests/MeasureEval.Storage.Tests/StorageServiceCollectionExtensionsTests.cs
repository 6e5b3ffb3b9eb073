using MeasureEval.Core.Storage;
using MeasureEval.Storage.Postgres;
using MeasureEval.Storage.Sqlite;
using MeasureEval.Testing;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

public sealed class StorageServiceCollectionExtensionsTests(PostgresServer server) : IClassFixture<PostgresServer>, IDisposable
{
    private readonly DirectoryInfo _contentRoot = Directory.CreateTempSubdirectory("measureeval-host-");

    public void Dispose() => _contentRoot.Delete(recursive: true);

    [Fact]
    public async Task AddMeasureEvalStorage_NoSettings_StartsSqliteInDataFolder()
    {
        using var host = BuildHost([]);

        await host.StartAsync();

        var store = Assert.IsType<SqliteResourceStore>(host.Services.GetRequiredService<IResourceStore>());
        Assert.Equal(Path.Combine(_contentRoot.FullName, "data", "measureeval.db"), store.DataSource);
        Assert.True(File.Exists(store.DataSource));
        Assert.True(await store.IsReadyAsync(default));
        await host.StopAsync();
    }

    [Fact]
    public async Task AddMeasureEvalStorage_RelativeSqliteFile_ResolvesAgainstContentRoot()
    {
        using var host = BuildHost(new() { ["Storage:ConnectionString"] = "Data Source=state/other.db" });

        await host.StartAsync();

        var store = Assert.IsType<SqliteResourceStore>(host.Services.GetRequiredService<IResourceStore>());
        Assert.Equal(Path.Combine(_contentRoot.FullName, "state", "other.db"), store.DataSource);
        await host.StopAsync();
    }

    [Fact]
    public async Task AddMeasureEvalStorage_PostgresWithoutConnectionString_FailsAtStart()
    {
        using var host = BuildHost(new() { ["Storage:Provider"] = "Postgres" });

        var failure = await Assert.ThrowsAsync<OptionsValidationException>(() => host.StartAsync());

        Assert.Single(failure.Failures);
    }

    [SkippableFact]
    public async Task AddMeasureEvalStorage_PostgresSelected_StartsPostgresStore()
    {
        Skip.IfNot(server.IsAvailable, server.UnavailableReason);
        using var host = BuildHost(new() { ["Storage:Provider"] = "Postgres", ["Storage:ConnectionString"] = await server.CreateSchemaAsync() });

        await host.StartAsync();

        var store = Assert.IsType<PostgresResourceStore>(host.Services.GetRequiredService<IResourceStore>());
        Assert.True(await store.IsReadyAsync(default));
        await host.StopAsync();
    }

    private IHost BuildHost(Dictionary<string, string?> settings)
    {
        var builder = Host.CreateEmptyApplicationBuilder(new HostApplicationBuilderSettings { ContentRootPath = _contentRoot.FullName });
        builder.Configuration.AddInMemoryCollection(settings);
        builder.Services.AddMeasureEvalStorage();
        return builder.Build();
    }
}
