using MeasureEval.Storage.Common;
using MeasureEval.Storage.Postgres;
using MeasureEval.Testing;
using Microsoft.Extensions.Logging.Abstractions;
using Npgsql;

namespace MeasureEval.Storage.Tests.Postgres;

/// <summary>The store contract on a throwaway PostgreSQL 15 server, one schema per test.</summary>
public sealed class PostgresResourceStoreTests(PostgresServer server) : ResourceStoreContract, IClassFixture<PostgresServer>
{
    [SkippableFact]
    public async System.Threading.Tasks.Task InitializeAsync_ConcurrentStarts_MigrateOnce()
    {
        Skip.IfNot(server.IsAvailable, server.UnavailableReason);
        var connectionString = await server.CreateSchemaAsync();
        await using var first = new PostgresResourceStore(connectionString, Time, NullLogger<PostgresResourceStore>.Instance);
        await using var second = new PostgresResourceStore(connectionString, Time, NullLogger<PostgresResourceStore>.Instance);

        await System.Threading.Tasks.Task.WhenAll(first.InitializeAsync(default), second.InitializeAsync(default));

        Assert.True(await first.IsReadyAsync(default));
        Assert.True(await second.IsReadyAsync(default));
    }

    private string? _connectionString;

    protected override string PartitionKeyBackfill => PostgresSchema.PartitionKeyBackfill;

    protected override async System.Threading.Tasks.Task ExecuteSqlAsync(string sql)
    {
        await using var connection = new NpgsqlConnection(_connectionString);
        await connection.OpenAsync();
        await using var command = new NpgsqlCommand(sql, connection);
        await command.ExecuteNonQueryAsync();
    }

    protected override async System.Threading.Tasks.Task<SqlResourceStore> CreateStoreAsync(IndexBatch? batch)
    {
        Skip.IfNot(server.IsAvailable, server.UnavailableReason);
        _connectionString = await server.CreateSchemaAsync();
        var store = batch is null
            ? new PostgresResourceStore(_connectionString, Time, NullLogger<PostgresResourceStore>.Instance)
            : new PostgresResourceStore(_connectionString, Time, NullLogger<PostgresResourceStore>.Instance) { IndexEntryBatch = batch.Entries, IndexFactBatch = batch.Facts };
        await store.InitializeAsync(default);
        return store;
    }
}
