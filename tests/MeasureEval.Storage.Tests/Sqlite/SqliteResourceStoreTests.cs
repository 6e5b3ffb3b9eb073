using MeasureEval.Storage.Common;
using MeasureEval.Storage.Sqlite;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Logging.Abstractions;

namespace MeasureEval.Storage.Tests.Sqlite;

/// <summary>The store contract on SQLite, one database file per test.</summary>
public sealed class SqliteResourceStoreTests : ResourceStoreContract, IDisposable
{
    private readonly DirectoryInfo _directory = Directory.CreateTempSubdirectory("measureeval-sqlite-");

    public void Dispose() => _directory.Delete(recursive: true);

    [Fact]
    public async System.Threading.Tasks.Task InitializeAsync_MissingDirectory_CreatesIt()
    {
        var file = Path.Combine(_directory.FullName, "nested", "data", "store.db");
        await using var store = new SqliteResourceStore($"Data Source={file}", Time, NullLogger<SqliteResourceStore>.Instance);

        await store.InitializeAsync(default);

        Assert.True(File.Exists(file));
        Assert.True(await store.IsReadyAsync(default));
    }

    [Fact]
    public async System.Threading.Tasks.Task InitializeAsync_NewFile_UsesWriteAheadLog()
    {
        await using var store = await CreateStoreAsync();

        await using var connection = new SqliteConnection($"Data Source={Path.Combine(_directory.FullName, "store.db")};Pooling=False");
        await connection.OpenAsync();
        await using var command = connection.CreateCommand();
        command.CommandText = "PRAGMA journal_mode";

        // SQLite documents journal_mode=WAL as persistent: a later connection reports it without setting it.
        Assert.Equal("wal", await command.ExecuteScalarAsync());
    }

    [Fact]
    public async System.Threading.Tasks.Task CommitAsync_ThousandWritesInSmallSessions_RefreshesPlannerStatistics()
    {
        await using var store = await CreateStoreAsync();
        for (var batch = 0; batch < 4; batch++)
        {
            await using var session = await store.BeginWriteAsync(default);
            for (var i = batch * 300; i < (batch + 1) * 300; i++)
            {
                await session.UpdateAsync(TestResources.ObservationOf($"obs-{i}", $"p{i % 300}"), null, default);
            }

            await session.CommitAsync(default);
        }

        await using var connection = new SqliteConnection($"Data Source={Path.Combine(_directory.FullName, "store.db")};Pooling=False");
        await connection.OpenAsync();
        await using var command = connection.CreateCommand();
        command.CommandText = "SELECT stat FROM sqlite_stat1 WHERE idx = 'resources_by_patient'";
        var stat = (string?)await command.ExecuteScalarAsync();

        // sqlite_stat1.stat starts with the number of rows in the index (SQLite fileformat2.html, "The sqlite_stat1 table").
        Assert.NotNull(stat);
        Assert.Equal("1200", stat.Split(' ')[0]);
    }

    [Fact]
    public async System.Threading.Tasks.Task IsReadyAsync_BeforeInitialize_ReturnsFalse()
    {
        await using var store = new SqliteResourceStore($"Data Source={Path.Combine(_directory.FullName, "empty.db")}", Time, NullLogger<SqliteResourceStore>.Instance);

        Assert.False(await store.IsReadyAsync(default));
    }

    protected override string PartitionKeyBackfill => SqliteSchema.PartitionKeyBackfill;

    protected override async System.Threading.Tasks.Task ExecuteSqlAsync(string sql)
    {
        await using var connection = new SqliteConnection($"Data Source={Path.Combine(_directory.FullName, "store.db")};Pooling=False");
        await connection.OpenAsync();
        await using var command = connection.CreateCommand();
        command.CommandText = sql;
        await command.ExecuteNonQueryAsync();
    }

    protected override async System.Threading.Tasks.Task<SqlResourceStore> CreateStoreAsync(IndexBatch? batch)
    {
        var connectionString = $"Data Source={Path.Combine(_directory.FullName, "store.db")}";
        var store = batch is null
            ? new SqliteResourceStore(connectionString, Time, NullLogger<SqliteResourceStore>.Instance)
            : new SqliteResourceStore(connectionString, Time, NullLogger<SqliteResourceStore>.Instance) { IndexEntryBatch = batch.Entries, IndexFactBatch = batch.Facts };
        await store.InitializeAsync(default);
        return store;
    }
}
