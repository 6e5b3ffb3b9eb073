using System.Data;
using System.Data.Common;
using System.Globalization;
using System.Runtime.CompilerServices;
using System.Text;
using MeasureEval.Core.Index;
using MeasureEval.Core.Partitions;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.Extensions.Logging;

namespace MeasureEval.Storage.Common;

/// <summary>
/// The store over ADO.NET, shared by both providers: the same tables and the same SQL wherever SQLite and PostgreSQL agree
/// (<c>ON CONFLICT</c> upserts, <c>LIMIT/OFFSET</c>, <c>TRUE/FALSE</c>). A provider supplies connections, the schema
/// scripts and the few statements that lock.
/// </summary>
public abstract partial class SqlResourceStore : IResourceStore, IAsyncDisposable
{
    /// <summary>Ids per query when streaming a chosen set of patients (well under both providers' parameter limits).</summary>
    private const int PatientIdChunk = 500;

    protected SqlResourceStore(TimeProvider timeProvider, ILogger logger)
    {
        TimeProvider = timeProvider ?? throw new ArgumentNullException(nameof(timeProvider));
        Logger = logger ?? throw new ArgumentNullException(nameof(logger));
    }

    internal TimeProvider TimeProvider { get; }

    /// <summary>
    /// Index entries a write session holds in memory before writing them back, and the facts they may hold together
    /// (a few hundred bytes each): bounds a bulk session's memory while letting one session over several resource types
    /// rewrite each patient's entry once.
    /// </summary>
    internal int IndexEntryBatch { get; init; } = 16_384;

    internal int IndexFactBatch { get; init; } = 250_000;

    protected ILogger Logger { get; }

    /// <summary>Scripts that bring the schema from version i to i+1 (index i). Never edit a released one: append.</summary>
    protected abstract IReadOnlyList<string> Migrations { get; }

    /// <summary>
    /// Returns (version, deleted, index_patient_id) of the resource's current row for parameters (type, id), locking it
    /// against concurrent writers until the transaction ends. Version 0 means the resource does not exist.
    /// </summary>
    internal abstract string LockCurrentSql { get; }

    /// <summary>Undoes what <see cref="LockCurrentSql"/> left behind for a resource that does not exist (parameters type, id), or null.</summary>
    internal abstract string? ReleaseAbsentSql { get; }

    /// <summary>Returns the stored facts (or no row / NULL) of patient @p0, locking the entry until the transaction ends.</summary>
    internal abstract string LockIndexEntrySql { get; }

    /// <summary>
    /// Keeps other writers (and other rebuilds) out while the index is rebuilt, run inside the rebuild transaction; null
    /// where a write session already excludes every other writer.
    /// </summary>
    internal abstract string? LockForRebuildSql { get; }

    /// <summary>
    /// Takes a lock held until the transaction ends on the 64-bit key @p0 (a conditional create's condition), or null where
    /// one write session at a time already excludes the race.
    /// </summary>
    internal abstract string? LockConditionSql { get; }

    protected abstract ValueTask<DbConnection> OpenConnectionAsync(CancellationToken cancellationToken);

    internal ValueTask<DbConnection> OpenReaderAsync(CancellationToken cancellationToken) => OpenConnectionAsync(cancellationToken);

    protected abstract ValueTask<DbTransaction> BeginWriteTransactionAsync(DbConnection connection, CancellationToken cancellationToken);

    /// <summary>Keeps a second process from migrating at the same time (inside the migration transaction).</summary>
    protected abstract System.Threading.Tasks.Task LockSchemaAsync(DbConnection connection, DbTransaction transaction, CancellationToken cancellationToken);

    /// <summary>Waits for the right to write, released when the session ends (SQLite: one writer; PostgreSQL: row locks instead).</summary>
    protected abstract ValueTask<IDisposable?> AcquireWriterAsync(CancellationToken cancellationToken);

    protected virtual System.Threading.Tasks.Task PrepareDatabaseAsync(CancellationToken cancellationToken) => System.Threading.Tasks.Task.CompletedTask;

    /// <summary>Runs after the schema is current, on the migration connection.</summary>
    protected virtual System.Threading.Tasks.Task OnInitializedAsync(DbConnection connection, CancellationToken cancellationToken) => System.Threading.Tasks.Task.CompletedTask;

    /// <summary>Runs after a session committed <paramref name="resourceWrites"/> resource versions, on its connection.</summary>
    internal virtual System.Threading.Tasks.Task OnCommittedAsync(DbConnection connection, int resourceWrites, CancellationToken cancellationToken) => System.Threading.Tasks.Task.CompletedTask;

    public async System.Threading.Tasks.Task InitializeAsync(CancellationToken cancellationToken)
    {
        await PrepareDatabaseAsync(cancellationToken).ConfigureAwait(false);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var transaction = await BeginWriteTransactionAsync(connection, cancellationToken).ConfigureAwait(false);
        await LockSchemaAsync(connection, transaction, cancellationToken).ConfigureAwait(false);
        await ExecuteAsync(connection, transaction, "CREATE TABLE IF NOT EXISTS schema_version (version INTEGER NOT NULL)", cancellationToken).ConfigureAwait(false);

        await using (var read = Command(connection, transaction, "SELECT MAX(version) FROM schema_version"))
        {
            var value = await read.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false);
            var current = value is null or DBNull ? 0 : Convert.ToInt32(value, CultureInfo.InvariantCulture);
            if (current > Migrations.Count)
            {
                throw new InvalidOperationException(
                    $"The database schema is version {current}, newer than this build knows ({Migrations.Count}).");
            }

            for (var version = current; version < Migrations.Count; version++)
            {
                await ExecuteAsync(connection, transaction, Migrations[version], cancellationToken).ConfigureAwait(false);
                await using var record = Command(connection, transaction, "INSERT INTO schema_version (version) VALUES (@p0)", version + 1);
                await record.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
                Logger.LogInformation("Storage schema migrated to version {SchemaVersion}", version + 1);
            }
        }

        await transaction.CommitAsync(cancellationToken).ConfigureAwait(false);
        await OnInitializedAsync(connection, cancellationToken).ConfigureAwait(false);

        // An index written in another layout (or by an older build) is rebuilt from the stored resources.
        await using var session = (SqlStoreSession)await BeginWriteAsync(cancellationToken).ConfigureAwait(false);
        if (await session.EnsureIndexFormatAsync(cancellationToken).ConfigureAwait(false))
        {
            Logger.LogInformation("Evaluation index rebuilt in format {IndexFormat}", PatientFactsCodec.Format);
        }

        if (await session.EnsurePayerLinksAsync(cancellationToken).ConfigureAwait(false))
        {
            Logger.LogInformation("Payer memberships derived from the stored Coverage and Group resources");
        }

        await session.CommitAsync(cancellationToken).ConfigureAwait(false);
    }

    /// <summary>
    /// Re-derives every index entry from the current stored resources, in one transaction: for use after a change to
    /// what the fact extractor keeps. Writers wait until it ends.
    /// </summary>
    public async System.Threading.Tasks.Task RebuildIndexAsync(CancellationToken cancellationToken)
    {
        await using var session = (SqlStoreSession)await BeginWriteAsync(cancellationToken).ConfigureAwait(false);
        await session.RebuildIndexAsync(cancellationToken).ConfigureAwait(false);
        await session.CommitAsync(cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task<bool> IsReadyAsync(CancellationToken cancellationToken)
    {
        try
        {
            await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
            await using var command = Command(connection, null, "SELECT MAX(version) FROM schema_version");
            var value = await command.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false);
            return value is not null and not DBNull;
        }
        catch (DbException ex)
        {
            Logger.LogWarning(ex, "Storage readiness check failed");
            return false;
        }
    }

    public async System.Threading.Tasks.Task<StoredResource?> ReadAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(scope);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var command = Command(connection, null, StoreSql.ReadCurrent, resourceType, id);
        var stored = await ReadOneAsync(command, resourceType, id, cancellationToken).ConfigureAwait(false);
        return stored is null || await new ScopeCheck(connection, scope).VisibleAsync(stored, cancellationToken).ConfigureAwait(false) ? stored : null;
    }

    public async System.Threading.Tasks.Task<StoredResource?> ReadVersionAsync(string resourceType, string id, int versionId, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(scope);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var command = Command(connection, null, StoreSql.ReadVersion, resourceType, id, versionId);
        var stored = await ReadOneAsync(command, resourceType, id, cancellationToken).ConfigureAwait(false);
        return stored is null || await new ScopeCheck(connection, scope).VisibleAsync(stored, cancellationToken).ConfigureAwait(false) ? stored : null;
    }

    public async System.Threading.Tasks.Task<IReadOnlyList<StoredResource>> HistoryAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(scope);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        var versions = new List<StoredResource>();
        await using (var command = Command(connection, null, StoreSql.History, resourceType, id))
        await using (var reader = await command.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false))
        {
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                versions.Add(ToStored(reader, resourceType, id));
            }
        }

        if (scope.IsUnrestricted)
        {
            return versions;
        }

        // Each version is judged by what it says (a resource moved to another patient shows each payer its own part);
        // a deletion by the version it deleted. Oldest first, so that body is at hand.
        var check = new ScopeCheck(connection, scope);
        var visible = new List<StoredResource>(versions.Count);
        var previousVisible = false;
        for (var i = versions.Count - 1; i >= 0; i--)
        {
            if (versions[i].Json is { } json)
            {
                previousVisible = await check.VisibleAsync(json, cancellationToken).ConfigureAwait(false);
            }

            if (previousVisible)
            {
                visible.Add(versions[i]);
            }
        }

        visible.Reverse();
        return visible;
    }

    public async System.Threading.Tasks.Task<SearchResult> SearchAsync(SearchQuery query, CancellationToken cancellationToken)
    {
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        return await SearchAsync(connection, null, query, cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task<IStoreSession> BeginWriteAsync(CancellationToken cancellationToken)
    {
        var writer = await AcquireWriterAsync(cancellationToken).ConfigureAwait(false);
        DbConnection? connection = null;
        try
        {
            connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
            var transaction = await BeginWriteTransactionAsync(connection, cancellationToken).ConfigureAwait(false);
            return new SqlStoreSession(this, connection, transaction, writer);
        }
        catch
        {
            if (connection is not null)
            {
                await connection.DisposeAsync().ConfigureAwait(false);
            }

            writer?.Dispose();
            throw;
        }
    }

    /// <summary>
    /// Runs <paramref name="write"/> in a write transaction of its own, queued like a write session (SQLite: behind the
    /// one writer), and commits it: for small writes outside the resource tables (the job table).
    /// </summary>
    internal async System.Threading.Tasks.Task<T> WriteAsync<T>(Func<DbConnection, DbTransaction, System.Threading.Tasks.Task<T>> write, CancellationToken cancellationToken)
    {
        using var writer = await AcquireWriterAsync(cancellationToken).ConfigureAwait(false);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var transaction = await BeginWriteTransactionAsync(connection, cancellationToken).ConfigureAwait(false);
        var result = await write(connection, transaction).ConfigureAwait(false);
        await transaction.CommitAsync(cancellationToken).ConfigureAwait(false);
        return result;
    }

    public async System.Threading.Tasks.Task<PatientFacts?> GetPatientFactsAsync(string patientId, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(patientId);
        ArgumentNullException.ThrowIfNull(scope);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        if (!await new ScopeCheck(connection, scope).IsMemberAsync(patientId, cancellationToken).ConfigureAwait(false))
        {
            return null;
        }

        await using var command = Command(connection, null, StoreSql.ReadIndexEntry, patientId);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        return await reader.ReadAsync(cancellationToken).ConfigureAwait(false) && !reader.IsDBNull(0)
            ? ScopeCheck.Narrow(PatientFactsCodec.Decode(reader.GetFieldValue<byte[]>(0)), scope)
            : null;
    }

    public async System.Threading.Tasks.Task<long> CountPatientFactsAsync(DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(scope);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        // The same filter as a full StreamPatientFactsAsync, so the count is what that stream yields for the scope.
        var values = new List<object?>();
        var sql = $"SELECT COUNT(*) FROM patient_index p WHERE facts IS NOT NULL{ScopeCheck.MemberFilter(scope, "p.patient_id", values)}";
        await using var command = Command(connection, null, sql, [.. values]);
        return Convert.ToInt64(await command.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false), CultureInfo.InvariantCulture);
    }

    public async IAsyncEnumerable<PatientFacts> StreamPatientFactsAsync(
        IReadOnlyCollection<string>? patientIds, DataScope scope, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(scope);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        if (patientIds is null)
        {
            var values = new List<object?>();
            var sql = $"SELECT facts FROM patient_index p WHERE facts IS NOT NULL{ScopeCheck.MemberFilter(scope, "p.patient_id", values)} ORDER BY patient_id";
            await using var all = Command(connection, null, sql, [.. values]);
            await foreach (var facts in ReadEntriesAsync(all, scope, cancellationToken).ConfigureAwait(false))
            {
                yield return facts;
            }

            yield break;
        }

        // Sorted chunks keep the whole stream in id order while each query stays small.
        var sorted = patientIds.Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToArray();
        foreach (var chunk in sorted.Chunk(PatientIdChunk))
        {
            var values = new List<object?>(chunk);
            var sql = new StringBuilder("SELECT facts FROM patient_index p WHERE facts IS NOT NULL AND patient_id IN (");
            for (var i = 0; i < chunk.Length; i++)
            {
                sql.Append(i == 0 ? "@p" : ", @p").Append(i.ToString(CultureInfo.InvariantCulture));
            }

            sql.Append(')').Append(ScopeCheck.MemberFilter(scope, "p.patient_id", values)).Append(" ORDER BY patient_id");
            await using var some = Command(connection, null, sql.ToString(), [.. values]);
            await foreach (var facts in ReadEntriesAsync(some, scope, cancellationToken).ConfigureAwait(false))
            {
                yield return facts;
            }
        }
    }

    public async IAsyncEnumerable<PatientFacts> StreamPartitionFactsAsync(
        int partition, int partitionCount, DataScope scope, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(scope);
        var (from, until) = PatientPartitioner.KeyRange(partition, partitionCount);
        var values = new List<object?> { from, until };
        var sql = $"""
            SELECT facts FROM patient_index p
            WHERE partition_key >= @p0 AND partition_key < @p1 AND facts IS NOT NULL{ScopeCheck.MemberFilter(scope, "p.patient_id", values)}
            ORDER BY patient_id
            """;
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var command = Command(connection, null, sql, [.. values]);
        await foreach (var facts in ReadEntriesAsync(command, scope, cancellationToken).ConfigureAwait(false))
        {
            yield return facts;
        }
    }

    public async ValueTask DisposeAsync()
    {
        await DisposeAsyncCore().ConfigureAwait(false);
        GC.SuppressFinalize(this);
    }

    protected virtual ValueTask DisposeAsyncCore() => ValueTask.CompletedTask;

    internal static async System.Threading.Tasks.Task<SearchResult> SearchAsync(
        DbConnection connection, DbTransaction? transaction, SearchQuery query, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentNullException.ThrowIfNull(query.Scope);
        ArgumentOutOfRangeException.ThrowIfNegative(query.Count);
        ArgumentOutOfRangeException.ThrowIfNegative(query.Offset);
        var values = new List<object?> { query.ResourceType };
        var where = new StringBuilder("r.type = @p0 AND r.deleted = FALSE AND r.version > 0");
        string Next(object? value)
        {
            values.Add(value);
            return "@p" + (values.Count - 1).ToString(CultureInfo.InvariantCulture);
        }

        if (query.Ids is { } ids)
        {
            where.Append(ids.Count == 0 ? " AND 1 = 0" : $" AND r.id IN ({string.Join(", ", ids.Select(id => Next(id)))})");
        }

        foreach (var range in query.LastUpdated ?? [])
        {
            if (range.From is { } from)
            {
                where.Append(" AND r.last_updated >= ").Append(Next(from.ToUnixTimeMilliseconds()));
            }

            if (range.Until is { } until)
            {
                where.Append(" AND r.last_updated < ").Append(Next(until.ToUnixTimeMilliseconds()));
            }
        }

        foreach (var range in query.LastUpdatedNotIn ?? [])
        {
            var outside = new List<string>();
            if (range.From is { } from)
            {
                outside.Add("r.last_updated < " + Next(from.ToUnixTimeMilliseconds()));
            }

            if (range.Until is { } until)
            {
                outside.Add("r.last_updated >= " + Next(until.ToUnixTimeMilliseconds()));
            }

            // A range open at both ends covers every instant, so nothing lies outside it.
            where.Append(outside.Count == 0 ? " AND 1 = 0" : $" AND ({string.Join(" OR ", outside)})");
        }

        if (query.PatientId is { } patientId)
        {
            where.Append(" AND r.patient_id = ").Append(Next(patientId));
        }

        where.Append(ScopeCheck.ResourceFilter(query.Scope, query.ResourceType, values));

        if (query.Identifiers is { } tokens)
        {
            var alternatives = tokens.Select(t => t.System is null
                ? $"i.value = {Next(t.Value)}"
                : $"(i.value = {Next(t.Value)} AND i.system = {Next(t.System)})").ToList();
            where.Append(alternatives.Count == 0
                ? " AND 1 = 0"
                : $" AND r.id IN (SELECT i.id FROM resource_identifiers i WHERE i.type = @p0 AND ({string.Join(" OR ", alternatives)}))");
        }

        int total;
        await using (var count = Command(connection, transaction, $"SELECT COUNT(*) FROM resources r WHERE {where}", [.. values]))
        {
            total = Convert.ToInt32(await count.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false), CultureInfo.InvariantCulture);
        }

        var matches = new List<StoredResource>();
        if (query.Count > 0 && query.Offset < total)
        {
            var page = $"""
                SELECT r.id, v.version, v.last_updated, v.deleted, v.json FROM resources r
                JOIN resource_versions v ON v.type = r.type AND v.id = r.id AND v.version = r.version
                WHERE {where} ORDER BY r.id LIMIT {Next(query.Count)} OFFSET {Next(query.Offset)}
                """;
            await using var select = Command(connection, transaction, page, [.. values]);
            await using var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                matches.Add(new StoredResource(
                    query.ResourceType,
                    reader.GetString(0),
                    reader.GetInt32(1),
                    DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(2)),
                    reader.GetBoolean(3),
                    reader.IsDBNull(4) ? null : reader.GetString(4)));
            }
        }

        return new SearchResult(matches, total);
    }

    /// <summary>Reads one row of (version, last_updated, deleted, json).</summary>
    internal static async System.Threading.Tasks.Task<StoredResource?> ReadOneAsync(DbCommand command, string resourceType, string id, CancellationToken cancellationToken)
    {
        await using var reader = await command.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        return await reader.ReadAsync(cancellationToken).ConfigureAwait(false) ? ToStored(reader, resourceType, id) : null;
    }

    internal static DbCommand Command(DbConnection connection, DbTransaction? transaction, string sql, params object?[] values)
    {
        var command = connection.CreateCommand();
        command.CommandText = sql;
        command.Transaction = transaction;
        for (var i = 0; i < values.Length; i++)
        {
            var parameter = command.CreateParameter();

            // With its prefix: Microsoft.Data.Sqlite otherwise tries "@", ":" and "$" on every execution.
            parameter.ParameterName = "@p" + i.ToString(CultureInfo.InvariantCulture);
            parameter.Value = values[i] ?? DBNull.Value;
            command.Parameters.Add(parameter);
        }

        return command;
    }

    protected static async System.Threading.Tasks.Task ExecuteAsync(DbConnection connection, DbTransaction? transaction, string sql, CancellationToken cancellationToken)
    {
        await using var command = Command(connection, transaction, sql);
        await command.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }

    internal static StoredResource ToStored(DbDataReader reader, string resourceType, string id) => new(
        resourceType,
        id,
        reader.GetInt32(0),
        DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(1)),
        reader.GetBoolean(2),
        reader.IsDBNull(3) ? null : reader.GetString(3));

    private static async IAsyncEnumerable<PatientFacts> ReadEntriesAsync(DbCommand command, DataScope scope, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        await using var reader = await command.ExecuteReaderAsync(CommandBehavior.SequentialAccess, cancellationToken).ConfigureAwait(false);
        while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            yield return ScopeCheck.Narrow(PatientFactsCodec.Decode(reader.GetFieldValue<byte[]>(0)), scope);
        }
    }
}
