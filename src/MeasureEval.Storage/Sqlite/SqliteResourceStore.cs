using System.Data.Common;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Logging;
using MeasureEval.Storage.Common;

namespace MeasureEval.Storage.Sqlite;

/// <summary>
/// The SQLite store: WAL so readers never wait for the writer, synchronous=NORMAL (durable across process crashes;
/// the last commits may be lost on power failure), and one writer at a time, queued in-process.
/// </summary>
public sealed class SqliteResourceStore : SqlResourceStore
{
    private readonly string _connectionString;
    /// <summary>Resource versions written after which planner statistics are refreshed.</summary>
    private const int OptimizeAfterWrites = 1000;

    private readonly SemaphoreSlim _writer = new(1, 1);
    private int _writesSinceOptimize;

    public SqliteResourceStore(string connectionString, TimeProvider timeProvider, ILogger<SqliteResourceStore> logger)
        : base(timeProvider, logger)
    {
        var builder = new SqliteConnectionStringBuilder(connectionString)
        {
            Mode = SqliteOpenMode.ReadWriteCreate,
            Pooling = true,
        };
        _connectionString = builder.ToString();
        DataSource = builder.DataSource;
    }

    /// <summary>The database file.</summary>
    public string DataSource { get; }

    protected override IReadOnlyList<string> Migrations => SqliteSchema.Migrations;

    // The single writer makes a plain read enough: nobody else can change the row before this session ends.
    internal override string LockCurrentSql => "SELECT version, deleted, index_patient_id FROM resources WHERE type = @p0 AND id = @p1";

    internal override string? ReleaseAbsentSql => null;

    internal override string? LockForRebuildSql => null;

    // One write session at a time: a conditional create's search and create cannot interleave with another's.
    internal override string? LockConditionSql => null;

    internal override string LockIndexEntrySql => "SELECT facts FROM patient_index WHERE patient_id = @p0";

    protected override async System.Threading.Tasks.Task PrepareDatabaseAsync(CancellationToken cancellationToken)
    {
        var directory = Path.GetDirectoryName(Path.GetFullPath(DataSource));
        if (!string.IsNullOrEmpty(directory))
        {
            Directory.CreateDirectory(directory);
        }

        // The journal mode is stored in the file: set once, it holds for every later connection.
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var wal = connection.CreateCommand();
        wal.CommandText = "PRAGMA journal_mode = WAL";
        await wal.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }

    // Without table statistics SQLite prefers scanning a type in id order (no sort) over the patient or lastUpdated
    // index: a patient search over millions of rows then takes seconds instead of a millisecond. SQLite advises
    // PRAGMA optimize at start (0x10002: also tables never analyzed) and after large changes; it analyzes only tables
    // whose size changed much, with a sampling limit, so it stays cheap.
    protected override async System.Threading.Tasks.Task OnInitializedAsync(DbConnection connection, CancellationToken cancellationToken) =>
        await RunPragmaAsync(connection, "PRAGMA optimize = 0x10002", cancellationToken).ConfigureAwait(false);

    internal override async System.Threading.Tasks.Task OnCommittedAsync(DbConnection connection, int resourceWrites, CancellationToken cancellationToken)
    {
        // Counted across sessions: a store that grows by many small writes needs fresh statistics too.
        if (Interlocked.Add(ref _writesSinceOptimize, resourceWrites) >= OptimizeAfterWrites)
        {
            Interlocked.Exchange(ref _writesSinceOptimize, 0);
            await RunPragmaAsync(connection, "PRAGMA optimize", cancellationToken).ConfigureAwait(false);
        }
    }

    protected override async ValueTask<DbConnection> OpenConnectionAsync(CancellationToken cancellationToken)
    {
        var connection = new SqliteConnection(_connectionString);
        try
        {
            await connection.OpenAsync(cancellationToken).ConfigureAwait(false);
            await using var pragmas = connection.CreateCommand();

            // These hold per connection.
            pragmas.CommandText = "PRAGMA synchronous = NORMAL; PRAGMA busy_timeout = 10000; PRAGMA cache_size = -65536;";
            await pragmas.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            return connection;
        }
        catch
        {
            await connection.DisposeAsync().ConfigureAwait(false);
            throw;
        }
    }

    protected override ValueTask<DbTransaction> BeginWriteTransactionAsync(DbConnection connection, CancellationToken cancellationToken) =>
        // BEGIN IMMEDIATE: take the write lock now, not at the first write, so another process makes us wait (busy_timeout) instead of failing mid-session.
        ValueTask.FromResult<DbTransaction>(((SqliteConnection)connection).BeginTransaction(deferred: false));

    protected override System.Threading.Tasks.Task LockSchemaAsync(DbConnection connection, DbTransaction transaction, CancellationToken cancellationToken) =>
        System.Threading.Tasks.Task.CompletedTask;

    protected override async ValueTask<IDisposable?> AcquireWriterAsync(CancellationToken cancellationToken)
    {
        await _writer.WaitAsync(cancellationToken).ConfigureAwait(false);
        return new WriterLease(_writer);
    }

    protected override ValueTask DisposeAsyncCore()
    {
        // Pooled connections keep the file open; release them so the file can be moved or deleted.
        using (var connection = new SqliteConnection(_connectionString))
        {
            SqliteConnection.ClearPool(connection);
        }

        _writer.Dispose();
        return ValueTask.CompletedTask;
    }

    private static async System.Threading.Tasks.Task RunPragmaAsync(DbConnection connection, string pragma, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.CommandText = pragma;
        await command.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }

    private sealed class WriterLease(SemaphoreSlim writer) : IDisposable
    {
        private SemaphoreSlim? _writer = writer;

        public void Dispose() => Interlocked.Exchange(ref _writer, null)?.Release();
    }
}
