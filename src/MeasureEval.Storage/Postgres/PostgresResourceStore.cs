using System.Data.Common;
using MeasureEval.Storage.Common;
using Microsoft.Extensions.Logging;
using Npgsql;

namespace MeasureEval.Storage.Postgres;

/// <summary>
/// The PostgreSQL store. Sessions run concurrently at READ COMMITTED; every resource and index entry a session writes
/// is first locked with an upsert that returns the latest committed row, so two sessions writing the same resource
/// queue behind each other and never reuse a version number (the (type, id, version) key backs this up).
/// </summary>
public sealed class PostgresResourceStore : SqlResourceStore
{
    /// <summary>Key of the advisory lock that serializes schema migration across processes.</summary>
    private const long SchemaLockKey = 0x4D45_5F53_4348_454D;

    private readonly NpgsqlDataSource _dataSource;

    public PostgresResourceStore(string connectionString, TimeProvider timeProvider, ILogger<PostgresResourceStore> logger)
        : base(timeProvider, logger)
    {
        var builder = new NpgsqlConnectionStringBuilder(connectionString);

        // Reused session statements are prepared on the server after a few executions.
        if (builder.MaxAutoPrepare == 0)
        {
            builder.MaxAutoPrepare = 32;
        }

        _dataSource = NpgsqlDataSource.Create(builder.ConnectionString);
    }

    protected override IReadOnlyList<string> Migrations => PostgresSchema.Migrations;

    // A placeholder row (version 0) is inserted when the resource is new; ON CONFLICT DO UPDATE locks an existing row
    // and, at READ COMMITTED, returns its latest committed state even if it changed after this statement began.
    internal override string LockCurrentSql => """
        INSERT INTO resources (type, id, version, last_updated, deleted, patient_id, index_patient_id)
        VALUES (@p0, @p1, 0, 0, TRUE, NULL, NULL)
        ON CONFLICT (type, id) DO UPDATE SET version = resources.version
        RETURNING version, deleted, index_patient_id
        """;

    internal override string? ReleaseAbsentSql => "DELETE FROM resources WHERE type = @p0 AND id = @p1 AND version = 0";

    // Conflicts with every writer's ROW EXCLUSIVE and with itself, not with readers.
    internal override string? LockForRebuildSql => "LOCK TABLE resources IN SHARE ROW EXCLUSIVE MODE";

    // Same idea for a patient's entry: a NULL placeholder when new, removed or filled when the session flushes.
    internal override string LockIndexEntrySql => """
        INSERT INTO patient_index (patient_id, facts) VALUES (@p0, NULL)
        ON CONFLICT (patient_id) DO UPDATE SET facts = patient_index.facts
        RETURNING facts
        """;

    // At READ COMMITTED two sessions with the same ifNoneExist would both see no match and both create. A transaction-scoped
    // advisory lock on the condition's hash makes the second wait; its search then runs on a fresh snapshot and finds
    // the first one's resource. A hash collision only makes unrelated conditions queue, never wrong.
    internal override string? LockConditionSql => "SELECT pg_advisory_xact_lock(@p0)";

    protected override async ValueTask<DbConnection> OpenConnectionAsync(CancellationToken cancellationToken) =>
        await _dataSource.OpenConnectionAsync(cancellationToken).ConfigureAwait(false);

    protected override async ValueTask<DbTransaction> BeginWriteTransactionAsync(DbConnection connection, CancellationToken cancellationToken) =>
        await connection.BeginTransactionAsync(System.Data.IsolationLevel.ReadCommitted, cancellationToken).ConfigureAwait(false);

    protected override async System.Threading.Tasks.Task LockSchemaAsync(DbConnection connection, DbTransaction transaction, CancellationToken cancellationToken)
    {
        await using var command = Command(connection, transaction, "SELECT pg_advisory_xact_lock(@p0)", SchemaLockKey);
        await command.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }

    protected override ValueTask<IDisposable?> AcquireWriterAsync(CancellationToken cancellationToken) => ValueTask.FromResult<IDisposable?>(null);

    protected override ValueTask DisposeAsyncCore() => _dataSource.DisposeAsync();
}
