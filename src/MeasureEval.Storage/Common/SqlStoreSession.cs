using System.Data.Common;
using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Core.Partitions;
using MeasureEval.Core.Storage;

namespace MeasureEval.Storage.Common;

/// <summary>
/// One write transaction. Statements are created once per session and reused with new parameter values, and index
/// entries are changed in memory and written back in batches, so a bulk ingest of many resources into one session
/// pays per resource only for its own rows. Where the provider has command batches (PostgreSQL), writes that return
/// nothing wait in a queue and travel with the session's next query or its commit: one round trip per resource.
/// An error in a queued write therefore surfaces at that later call; the session is unusable afterwards either way.
/// </summary>
internal sealed class SqlStoreSession : IStoreSession
{

    private readonly SqlResourceStore _store;
    private readonly DbConnection _connection;
    private readonly DbTransaction _transaction;
    private readonly IDisposable? _writer;
    private readonly Dictionary<string, DbCommand> _commands = new(StringComparer.Ordinal);
    private readonly Dictionary<string, PatientIndexEntry> _entries = new(StringComparer.Ordinal);
    private readonly List<(string Sql, object?[] Values)> _queued = [];
    private bool _finished;
    private int _resourceWrites;
    private int _cachedFacts;

    public SqlStoreSession(SqlResourceStore store, DbConnection connection, DbTransaction transaction, IDisposable? writer)
    {
        _store = store;
        _connection = connection;
        _transaction = transaction;
        _writer = writer;
    }

    public async System.Threading.Tasks.Task<StoredResource> CreateAsync(Resource resource, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(resource);
        EnsureOpen();
        var id = ResourceKeys.NewId(_store.TimeProvider);
        return await WriteAsync(resource, id, version: 1, previousIndexPatient: null, cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task<WriteResult> UpdateAsync(Resource resource, int? ifMatchVersion, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(resource);
        EnsureOpen();
        var id = resource.Id;
        if (!ResourceKeys.IsValidId(id))
        {
            throw new ArgumentException("The resource has no valid FHIR id.", nameof(resource));
        }

        var type = resource.TypeName;
        var current = await LockCurrentAsync(type, id, cancellationToken).ConfigureAwait(false);
        if (ifMatchVersion is { } expected && current?.Version != expected)
        {
            return await ConflictAsync(type, id, current, cancellationToken).ConfigureAwait(false);
        }

        var stored = await WriteAsync(resource, id, (current?.Version ?? 0) + 1, current?.IndexPatient, cancellationToken).ConfigureAwait(false);
        return new WriteResult(stored, Created: current is null || current.Deleted, VersionConflict: false);
    }

    public async System.Threading.Tasks.Task<WriteResult> DeleteAsync(string resourceType, string id, int? ifMatchVersion, CancellationToken cancellationToken)
    {
        ArgumentException.ThrowIfNullOrEmpty(resourceType);
        ArgumentException.ThrowIfNullOrEmpty(id);
        EnsureOpen();
        var current = await LockCurrentAsync(resourceType, id, cancellationToken).ConfigureAwait(false);
        if (ifMatchVersion is { } expected && current?.Version != expected)
        {
            return await ConflictAsync(resourceType, id, current, cancellationToken).ConfigureAwait(false);
        }

        if (current is null)
        {
            await ReleaseAbsentAsync(resourceType, id, cancellationToken).ConfigureAwait(false);
            return new WriteResult(null, Created: false, VersionConflict: false);
        }

        if (current.Deleted)
        {
            return new WriteResult(await ReadAsync(resourceType, id, cancellationToken).ConfigureAwait(false), Created: false, VersionConflict: false);
        }

        var version = current.Version + 1;
        var now = Now();
        _resourceWrites++;
        var lastUpdated = now.ToUnixTimeMilliseconds();
        var statements = new List<(string, object?[])>
        {
            (StoreSql.InsertVersion, [resourceType, id, version, lastUpdated, true, null]),
            (StoreSql.UpsertCurrent, [resourceType, id, version, lastUpdated, true, null, null]),
            (StoreSql.DeleteIdentifiers, [resourceType, id]),
        };
        if (PayerLinks.IsOwnedType(resourceType))
        {
            statements.Add((StoreSql.DeletePayerMembers, [resourceType, id]));
            statements.Add((StoreSql.DeletePayerResources, [resourceType, id]));
        }

        await RunAsync(statements, cancellationToken).ConfigureAwait(false);
        if (current.IndexPatient is { } patientId)
        {
            (await EntryAsync(patientId, cancellationToken).ConfigureAwait(false)).Remove(resourceType, id);
        }

        return new WriteResult(new StoredResource(resourceType, id, version, now, Deleted: true, Json: null), Created: false, VersionConflict: false);
    }

    public async System.Threading.Tasks.Task<StoredResource?> ReadAsync(string resourceType, string id, CancellationToken cancellationToken)
    {
        EnsureOpen();
        return await QueryAsync(
            StoreSql.ReadCurrent,
            [resourceType, id],
            async (reader, ct) => await reader.ReadAsync(ct).ConfigureAwait(false) ? SqlResourceStore.ToStored(reader, resourceType, id) : null,
            cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task<SearchResult> SearchAsync(SearchQuery query, CancellationToken cancellationToken)
    {
        EnsureOpen();
        await SendQueuedAsync(cancellationToken).ConfigureAwait(false);
        return await SqlResourceStore.SearchAsync(_connection, _transaction, query, cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task LockConditionAsync(SearchQuery condition, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(condition);
        EnsureOpen();
        if (_store.LockConditionSql is not { } sql)
        {
            return;
        }

        await QueryAsync(sql, [ConditionKeys.Of(condition)], async (reader, ct) => await reader.ReadAsync(ct).ConfigureAwait(false), cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task CommitAsync(CancellationToken cancellationToken)
    {
        EnsureOpen();
        await FlushIndexAsync(cancellationToken).ConfigureAwait(false);
        await SendQueuedAsync(cancellationToken).ConfigureAwait(false);
        await _transaction.CommitAsync(cancellationToken).ConfigureAwait(false);
        _finished = true;
        await _store.OnCommittedAsync(_connection, _resourceWrites, cancellationToken).ConfigureAwait(false);
    }

    public async ValueTask DisposeAsync()
    {
        try
        {
            foreach (var command in _commands.Values)
            {
                await command.DisposeAsync().ConfigureAwait(false);
            }

            // Disposing an uncommitted transaction rolls it back.
            await _transaction.DisposeAsync().ConfigureAwait(false);
            await _connection.DisposeAsync().ConfigureAwait(false);
        }
        finally
        {
            _finished = true;
            _writer?.Dispose();
        }
    }

    /// <summary>Rebuilds the index unless it is already in the codec's format; true when it rebuilt.</summary>
    internal async System.Threading.Tasks.Task<bool> EnsureIndexFormatAsync(CancellationToken cancellationToken)
    {
        EnsureOpen();
        if (await IndexFormatAsync(cancellationToken).ConfigureAwait(false) == PatientFactsCodec.Format)
        {
            return false;
        }

        await LockForRebuildAsync(cancellationToken).ConfigureAwait(false);

        // Another process may have rebuilt it while this one waited for the lock.
        if (await IndexFormatAsync(cancellationToken).ConfigureAwait(false) == PatientFactsCodec.Format)
        {
            return false;
        }

        await RebuildCoreAsync(cancellationToken).ConfigureAwait(false);
        return true;
    }

    internal async System.Threading.Tasks.Task RebuildIndexAsync(CancellationToken cancellationToken)
    {
        EnsureOpen();
        await LockForRebuildAsync(cancellationToken).ConfigureAwait(false);
        await RebuildCoreAsync(cancellationToken).ConfigureAwait(false);
    }

    private async System.Threading.Tasks.Task RebuildCoreAsync(CancellationToken cancellationToken)
    {
        await FlushIndexAsync(cancellationToken).ConfigureAwait(false);
        await RunAsync([("DELETE FROM patient_index", [])], cancellationToken).ConfigureAwait(false);

        // Read on a second connection: this one is busy writing. It sees the committed resources, which the lock keeps
        // from changing until this transaction ends.
        var types = FactExtractor.IndexedTypes.Order(StringComparer.Ordinal).ToArray<object?>();
        await using (var reader = await _store.OpenReaderAsync(cancellationToken).ConfigureAwait(false))
        await using (var select = SqlResourceStore.Command(reader, null, StoreSql.CurrentIndexedResources(types.Length), types))
        await using (var rows = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false))
        {
            while (await rows.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                var (type, id) = (rows.GetString(0), rows.GetString(1));
                var contribution = FactExtractor.TryExtract(FhirJson.Parse<Resource>(rows.GetString(2)), out var extracted) ? extracted : null;
                await RunAsync([(StoreSql.SetIndexPatient, [type, id, contribution?.PatientId])], cancellationToken).ConfigureAwait(false);
                if (contribution is not null)
                {
                    (await EntryAsync(contribution.PatientId, cancellationToken).ConfigureAwait(false)).Add(contribution);
                    _cachedFacts++;
                }
            }
        }

        await FlushIndexAsync(cancellationToken).ConfigureAwait(false);
        await RunAsync(
            [("DELETE FROM index_state", []), ("INSERT INTO index_state (format) VALUES (@p0)", [(int)PatientFactsCodec.Format])],
            cancellationToken).ConfigureAwait(false);
    }

    /// <summary>
    /// Derives the payer tables from the current Coverage and Group resources once, after the script that created them
    /// (stores written before payer scoping existed); true when it did.
    /// </summary>
    internal async System.Threading.Tasks.Task<bool> EnsurePayerLinksAsync(CancellationToken cancellationToken)
    {
        EnsureOpen();
        if (await PayerLinksDerivedAsync(cancellationToken).ConfigureAwait(false))
        {
            return false;
        }

        await LockForRebuildAsync(cancellationToken).ConfigureAwait(false);
        if (await PayerLinksDerivedAsync(cancellationToken).ConfigureAwait(false))
        {
            return false;
        }

        var statements = new List<(string, object?[])> { ("DELETE FROM payer_members", []), ("DELETE FROM payer_resources", []) };
        await using (var reader = await _store.OpenReaderAsync(cancellationToken).ConfigureAwait(false))
        await using (var select = SqlResourceStore.Command(reader, null, StoreSql.CurrentOwnedResources))
        await using (var rows = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false))
        {
            while (await rows.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                AddPayerLinks(statements, FhirJson.Parse<Resource>(rows.GetString(2)), rows.GetString(0), rows.GetString(1));
                if (statements.Count >= 1000)
                {
                    await RunAsync(statements, cancellationToken).ConfigureAwait(false);
                    statements.Clear();
                }
            }
        }

        statements.Add(("INSERT INTO payer_scope_state (derived) VALUES (1)", []));
        await RunAsync(statements, cancellationToken).ConfigureAwait(false);
        return true;
    }

    private async System.Threading.Tasks.Task<bool> PayerLinksDerivedAsync(CancellationToken cancellationToken) =>
        await QueryAsync(
            "SELECT COUNT(*) FROM payer_scope_state",
            [],
            async (reader, ct) => await reader.ReadAsync(ct).ConfigureAwait(false) && Convert.ToInt64(reader.GetValue(0), CultureInfo.InvariantCulture) > 0,
            cancellationToken).ConfigureAwait(false);

    private static void AddPayerLinks(List<(string, object?[])> statements, Resource resource, string type, string id)
    {
        foreach (var owner in PayerLinks.OwnersOf(resource))
        {
            statements.Add((StoreSql.InsertPayerResource, [type, id, owner]));
        }

        foreach (var member in PayerLinks.MembershipsOf(resource))
        {
            statements.Add((StoreSql.InsertPayerMember, [member.PayerId, member.PatientId, type, id, member.PeriodStart, member.PeriodEnd]));
        }
    }

    private async System.Threading.Tasks.Task<int?> IndexFormatAsync(CancellationToken cancellationToken) =>
        await QueryAsync<int?>(
            StoreSql.ReadIndexFormat,
            [],
            async (reader, ct) => await reader.ReadAsync(ct).ConfigureAwait(false) && !reader.IsDBNull(0) ? reader.GetInt32(0) : null,
            cancellationToken).ConfigureAwait(false);

    private async System.Threading.Tasks.Task LockForRebuildAsync(CancellationToken cancellationToken)
    {
        if (_store.LockForRebuildSql is { } lockSql)
        {
            await QueryAsync(lockSql, [], (_, _) => System.Threading.Tasks.Task.FromResult(true), cancellationToken).ConfigureAwait(false);
        }
    }

    private async System.Threading.Tasks.Task<StoredResource> WriteAsync(
        Resource resource, string id, int version, string? previousIndexPatient, CancellationToken cancellationToken)
    {
        var type = resource.TypeName;
        var now = Now();
        _resourceWrites++;
        resource.Id = id;
        resource.Meta ??= new Meta();
        resource.Meta.VersionId = version.ToString(CultureInfo.InvariantCulture);
        resource.Meta.LastUpdated = now;
        var json = FhirJson.Serialize(resource);
        var lastUpdated = now.ToUnixTimeMilliseconds();
        var contribution = FactExtractor.TryExtract(resource, out var extracted) ? extracted : null;

        var statements = new List<(string, object?[])>(4)
        {
            (StoreSql.InsertVersion, [type, id, version, lastUpdated, false, json]),
            (StoreSql.UpsertCurrent, [type, id, version, lastUpdated, false, ResourceKeys.CompartmentPatientOf(resource), contribution?.PatientId]),
        };
        if (version > 1)
        {
            statements.Add((StoreSql.DeleteIdentifiers, [type, id]));
        }

        foreach (var (system, value) in ResourceKeys.IdentifiersOf(resource))
        {
            statements.Add((StoreSql.InsertIdentifier, [type, id, system, value]));
        }

        if (PayerLinks.IsOwnedType(type))
        {
            // Memberships follow the current version only: the previous version's rows go in the same transaction.
            if (version > 1)
            {
                statements.Add((StoreSql.DeletePayerMembers, [type, id]));
                statements.Add((StoreSql.DeletePayerResources, [type, id]));
            }

            AddPayerLinks(statements, resource, type, id);
        }

        await RunAsync(statements, cancellationToken).ConfigureAwait(false);

        if (previousIndexPatient is not null)
        {
            (await EntryAsync(previousIndexPatient, cancellationToken).ConfigureAwait(false)).Remove(type, id);
        }

        if (contribution is not null)
        {
            (await EntryAsync(contribution.PatientId, cancellationToken).ConfigureAwait(false)).Add(contribution);
            _cachedFacts++;
        }

        return new StoredResource(type, id, version, now, Deleted: false, json);
    }

    private async System.Threading.Tasks.Task<WriteResult> ConflictAsync(string type, string id, CurrentRow? current, CancellationToken cancellationToken)
    {
        if (current is null)
        {
            await ReleaseAbsentAsync(type, id, cancellationToken).ConfigureAwait(false);
        }

        var stored = current is null ? null : await ReadAsync(type, id, cancellationToken).ConfigureAwait(false);
        return new WriteResult(stored, Created: false, VersionConflict: true);
    }

    private async System.Threading.Tasks.Task ReleaseAbsentAsync(string type, string id, CancellationToken cancellationToken)
    {
        if (_store.ReleaseAbsentSql is { } release)
        {
            await RunAsync([(release, [type, id])], cancellationToken).ConfigureAwait(false);
        }
    }

    /// <summary>The current row, locked for this transaction; null when the resource was never stored.</summary>
    private async System.Threading.Tasks.Task<CurrentRow?> LockCurrentAsync(string type, string id, CancellationToken cancellationToken)
    {
        return await QueryAsync<CurrentRow?>(
            _store.LockCurrentSql,
            [type, id],
            async (reader, ct) =>
            {
                if (!await reader.ReadAsync(ct).ConfigureAwait(false))
                {
                    return null;
                }

                var version = reader.GetInt32(0);
                return version == 0 ? null : new CurrentRow(version, reader.GetBoolean(1), reader.IsDBNull(2) ? null : reader.GetString(2));
            },
            cancellationToken).ConfigureAwait(false);
    }

    private async System.Threading.Tasks.Task<PatientIndexEntry> EntryAsync(string patientId, CancellationToken cancellationToken)
    {
        if (_entries.TryGetValue(patientId, out var entry))
        {
            return entry;
        }

        if (_entries.Count >= _store.IndexEntryBatch || _cachedFacts >= _store.IndexFactBatch)
        {
            await FlushIndexAsync(cancellationToken).ConfigureAwait(false);
        }

        var stored = await QueryAsync(
            _store.LockIndexEntrySql,
            [patientId],
            async (reader, ct) => await reader.ReadAsync(ct).ConfigureAwait(false) && !reader.IsDBNull(0)
                ? PatientFactsCodec.Decode(reader.GetFieldValue<byte[]>(0))
                : null,
            cancellationToken).ConfigureAwait(false);
        entry = PatientIndexEntry.From(stored);
        _cachedFacts += entry.Count;
        _entries.Add(patientId, entry);
        return entry;
    }

    private async System.Threading.Tasks.Task FlushIndexAsync(CancellationToken cancellationToken)
    {
        if (_entries.Count == 0)
        {
            return;
        }

        var statements = _entries.Select(e => e.Value.IsEmpty
            ? (StoreSql.DeleteIndexEntry, new object?[] { e.Key })
            : (StoreSql.UpsertIndexEntry, [e.Key, PatientFactsCodec.Encode(e.Value.ToFacts(e.Key)), (long)PatientPartitioner.PartitionKey(e.Key)])).ToList();
        await RunAsync(statements, cancellationToken).ConfigureAwait(false);
        _entries.Clear();
        _cachedFacts = 0;
    }

    private DateTimeOffset Now()
    {
        // Stored to the millisecond, so the body's meta.lastUpdated and the searchable column agree.
        var now = _store.TimeProvider.GetUtcNow();
        return DateTimeOffset.FromUnixTimeMilliseconds(now.ToUnixTimeMilliseconds());
    }

    /// <summary>
    /// Runs statements that return nothing: queued to travel with the next query where the provider has batches,
    /// otherwise at once through the session's reused commands (SQLite: in-process calls, no round trips to save).
    /// </summary>
    private async System.Threading.Tasks.Task RunAsync(IReadOnlyList<(string Sql, object?[] Values)> statements, CancellationToken cancellationToken)
    {
        if (_connection.CanCreateBatch)
        {
            _queued.AddRange(statements);
            return;
        }

        foreach (var (sql, values) in statements)
        {
            await ExecuteAsync(sql, cancellationToken, values).ConfigureAwait(false);
        }
    }

    /// <summary>Runs a query after the queued writes, in the same round trip when there are any.</summary>
    private async System.Threading.Tasks.Task<T> QueryAsync<T>(
        string sql, object?[] values, Func<DbDataReader, CancellationToken, System.Threading.Tasks.Task<T>> read, CancellationToken cancellationToken)
    {
        if (_queued.Count == 0)
        {
            await using var reader = await Prepared(sql, values).ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
            return await read(reader, cancellationToken).ConfigureAwait(false);
        }

        await using var batch = TakeQueued();
        batch.BatchCommands.Add(BatchCommand(batch, sql, values));
        await using var batchReader = await batch.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);

        // The queued writes return no rows; the query's rows are the last result.
        while (batchReader.FieldCount == 0 && await batchReader.NextResultAsync(cancellationToken).ConfigureAwait(false))
        {
        }

        return await read(batchReader, cancellationToken).ConfigureAwait(false);
    }

    private async System.Threading.Tasks.Task SendQueuedAsync(CancellationToken cancellationToken)
    {
        if (_queued.Count > 0)
        {
            await using var batch = TakeQueued();
            await batch.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
        }
    }

    private DbBatch TakeQueued()
    {
        var batch = _connection.CreateBatch();
        batch.Transaction = _transaction;
        foreach (var (sql, values) in _queued)
        {
            batch.BatchCommands.Add(BatchCommand(batch, sql, values));
        }

        _queued.Clear();
        return batch;
    }

    private static DbBatchCommand BatchCommand(DbBatch batch, string sql, object?[] values)
    {
        var command = batch.CreateBatchCommand();
        command.CommandText = sql;
        for (var i = 0; i < values.Length; i++)
        {
            var parameter = command.CreateParameter();
            parameter.ParameterName = "@p" + i.ToString(CultureInfo.InvariantCulture);
            parameter.Value = values[i] ?? DBNull.Value;
            command.Parameters.Add(parameter);
        }

        return command;
    }

    private async System.Threading.Tasks.Task ExecuteAsync(string sql, CancellationToken cancellationToken, params object?[] values) =>
        await Prepared(sql, values).ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);

    /// <summary>The session's command for this statement, created on first use, with the given parameter values.</summary>
    private DbCommand Prepared(string sql, params object?[] values)
    {
        if (!_commands.TryGetValue(sql, out var command))
        {
            command = SqlResourceStore.Command(_connection, _transaction, sql, values);
            _commands.Add(sql, command);
            return command;
        }

        for (var i = 0; i < values.Length; i++)
        {
            command.Parameters[i].Value = values[i] ?? DBNull.Value;
        }

        return command;
    }

    private void EnsureOpen() => ObjectDisposedException.ThrowIf(_finished, this);

    private sealed record CurrentRow(int Version, bool Deleted, string? IndexPatient);
}
