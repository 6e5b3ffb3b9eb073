using System.Data.Common;
using System.Globalization;
using System.Text;
using MeasureEval.Core.Audit;

namespace MeasureEval.Storage.Common;

/// <summary>
/// The audit trail: table <c>audit_events</c> (one row per request) and <c>audit_event_patients</c> (the patients it
/// concerned, searchable by patient). Separate from <c>resources</c>, so no FHIR read or search route can reach it.
/// </summary>
public abstract partial class SqlResourceStore : IAuditStore
{
    private const string AuditColumns = "id, recorded, agent, role, payer, operation, interaction, action, method, route, status, address, request_id, patient_count";

    /// <summary>Records waiting for the next group write, and the right to write one.</summary>
    private readonly System.Collections.Concurrent.ConcurrentQueue<(AuditRecord Record, System.Threading.Tasks.TaskCompletionSource Written)> _auditQueue = new();
    private readonly SemaphoreSlim _auditGate = new(1, 1);

    /// <summary>Most records one group write takes.</summary>
    private const int AuditGroup = 256;

    /// <summary>
    /// Group commit: concurrent appends queue, and whoever holds the gate writes everything queued in one transaction,
    /// so N requests arriving together cost one write, not N (on SQLite they share its single writer with all sessions).
    /// Each caller's task completes only once its own record is committed (or fails with the group's error).
    /// </summary>
    public async System.Threading.Tasks.Task AppendAsync(AuditRecord record, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(record);
        var written = new System.Threading.Tasks.TaskCompletionSource(System.Threading.Tasks.TaskCreationOptions.RunContinuationsAsynchronously);
        _auditQueue.Enqueue((record, written));
        while (!written.Task.IsCompleted)
        {
            await _auditGate.WaitAsync(cancellationToken).ConfigureAwait(false);
            try
            {
                if (!written.Task.IsCompleted)
                {
                    await WriteAuditGroupAsync(cancellationToken).ConfigureAwait(false);
                }
            }
            finally
            {
                _auditGate.Release();
            }
        }

        await written.Task.ConfigureAwait(false);
    }

    private async System.Threading.Tasks.Task WriteAuditGroupAsync(CancellationToken cancellationToken)
    {
        var group = new List<(AuditRecord Record, System.Threading.Tasks.TaskCompletionSource Written)>();
        while (group.Count < AuditGroup && _auditQueue.TryDequeue(out var next))
        {
            group.Add(next);
        }

        if (group.Count == 0)
        {
            return;
        }

        try
        {
            await WriteAuditAsync(async (connection, transaction) =>
            {
                await using var insert = Command(connection, transaction, $"INSERT INTO audit_events ({AuditColumns}) VALUES (@p0, @p1, @p2, @p3, @p4, @p5, @p6, @p7, @p8, @p9, @p10, @p11, @p12, @p13)",
                    new object?[14]);
                foreach (var (record, _) in group)
                {
                    object?[] values =
                    [
                        record.Id, record.Recorded.ToUnixTimeMilliseconds(), record.Agent, record.Role, record.Payer, record.Operation, record.Interaction,
                        record.Action, record.Method, record.Route, record.Status, record.Address, record.RequestId, Math.Max(record.PatientCount, record.Patients.Count),
                    ];
                    for (var i = 0; i < values.Length; i++)
                    {
                        insert.Parameters[i].Value = values[i] ?? DBNull.Value;
                    }

                    await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
                    await InsertAuditPatientsAsync(connection, transaction, record.Id, record.Patients, cancellationToken).ConfigureAwait(false);
                }
            }, cancellationToken).ConfigureAwait(false);
        }
        catch (Exception ex)
        {
            // Every caller of the group learns of the failure through its own task (the writer's record may be in a
            // later group); none is told its record was kept.
            foreach (var (_, written) in group)
            {
                written.TrySetException(ex);
            }

            return;
        }

        foreach (var (_, written) in group)
        {
            written.TrySetResult();
        }
    }

    public async System.Threading.Tasks.Task CompleteAsync(string id, IReadOnlyList<string> morePatients, int patientCount, int status, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(id);
        ArgumentNullException.ThrowIfNull(morePatients);
        await WriteAuditAsync(async (connection, transaction) =>
        {
            await using (var update = Command(connection, transaction, "UPDATE audit_events SET status = @p1, patient_count = @p2 WHERE id = @p0", id, status, patientCount))
            {
                await update.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
            }

            await InsertAuditPatientsAsync(connection, transaction, id, morePatients, cancellationToken).ConfigureAwait(false);
        }, cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task<AuditRecord?> ReadAuditAsync(string id, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(id);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        var found = await ReadAuditRowsAsync(connection, $"SELECT {AuditColumns} FROM audit_events WHERE id = @p0", [id], cancellationToken).ConfigureAwait(false);
        return found.Count == 0 ? null : found[0];
    }

    public async System.Threading.Tasks.Task<AuditSearchResult> SearchAuditAsync(AuditQuery query, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentOutOfRangeException.ThrowIfNegative(query.Count);
        ArgumentOutOfRangeException.ThrowIfNegative(query.Offset);
        var values = new List<object?>();
        var where = new StringBuilder("1 = 1");
        string Next(object? value)
        {
            values.Add(value);
            return "@p" + (values.Count - 1).ToString(CultureInfo.InvariantCulture);
        }

        if (query.From is { } from)
        {
            where.Append(" AND e.recorded >= ").Append(Next(from.ToUnixTimeMilliseconds()));
        }

        if (query.Until is { } until)
        {
            where.Append(" AND e.recorded < ").Append(Next(until.ToUnixTimeMilliseconds()));
        }

        if (query.Agent is { } agent)
        {
            where.Append(" AND e.agent = ").Append(Next(agent));
        }

        if (query.PatientId is { } patientId)
        {
            where.Append(" AND e.id IN (SELECT p.event_id FROM audit_event_patients p WHERE p.patient_id = ").Append(Next(patientId)).Append(')');
        }

        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        int total;
        await using (var count = Command(connection, null, $"SELECT COUNT(*) FROM audit_events e WHERE {where}", [.. values]))
        {
            total = Convert.ToInt32(await count.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false), CultureInfo.InvariantCulture);
        }

        if (query.Count == 0 || query.Offset >= total)
        {
            return new AuditSearchResult([], total);
        }

        var page = $"SELECT {string.Join(", ", AuditColumns.Split(", ").Select(c => "e." + c))} FROM audit_events e WHERE {where} "
            + $"ORDER BY e.recorded DESC, e.id DESC LIMIT {Next(query.Count)} OFFSET {Next(query.Offset)}";
        return new AuditSearchResult(await ReadAuditRowsAsync(connection, page, [.. values], cancellationToken).ConfigureAwait(false), total);
    }

    /// <summary>One short write transaction; on SQLite it queues behind the single writer like any session.</summary>
    private async System.Threading.Tasks.Task WriteAuditAsync(Func<DbConnection, DbTransaction, System.Threading.Tasks.Task> write, CancellationToken cancellationToken)
    {
        using var writer = await AcquireWriterAsync(cancellationToken).ConfigureAwait(false);
        await using var connection = await OpenConnectionAsync(cancellationToken).ConfigureAwait(false);
        await using var transaction = await BeginWriteTransactionAsync(connection, cancellationToken).ConfigureAwait(false);
        await write(connection, transaction).ConfigureAwait(false);
        await transaction.CommitAsync(cancellationToken).ConfigureAwait(false);
    }

    private static async System.Threading.Tasks.Task InsertAuditPatientsAsync(
        DbConnection connection, DbTransaction transaction, string eventId, IReadOnlyList<string> patients, CancellationToken cancellationToken)
    {
        if (patients.Count == 0)
        {
            return;
        }

        await using var insert = Command(connection, transaction,
            "INSERT INTO audit_event_patients (patient_id, event_id) VALUES (@p0, @p1) ON CONFLICT (patient_id, event_id) DO NOTHING", "", eventId);
        foreach (var patient in patients.Distinct(StringComparer.Ordinal).Take(AuditRecord.MaxPatientsListed))
        {
            insert.Parameters[0].Value = patient;
            await insert.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
        }
    }

    private static async System.Threading.Tasks.Task<List<AuditRecord>> ReadAuditRowsAsync(
        DbConnection connection, string sql, object?[] values, CancellationToken cancellationToken)
    {
        var records = new List<AuditRecord>();
        await using (var select = Command(connection, null, sql, values))
        await using (var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false))
        {
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                string? Text(int i) => reader.IsDBNull(i) ? null : reader.GetString(i);
                records.Add(new AuditRecord
                {
                    Id = reader.GetString(0),
                    Recorded = DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(1)),
                    Agent = reader.GetString(2),
                    Role = Text(3),
                    Payer = Text(4),
                    Operation = reader.GetString(5),
                    Interaction = reader.GetString(6),
                    Action = reader.GetString(7),
                    Method = reader.GetString(8),
                    Route = reader.GetString(9),
                    Status = reader.GetInt32(10),
                    Address = Text(11),
                    RequestId = Text(12),
                    PatientCount = reader.GetInt32(13),
                });
            }
        }

        if (records.Count == 0)
        {
            return records;
        }

        var patients = records.ToDictionary(r => r.Id, _ => new List<string>(), StringComparer.Ordinal);
        var ids = records.Select(r => (object?)r.Id).ToArray();
        var placeholders = string.Join(", ", Enumerable.Range(0, ids.Length).Select(i => "@p" + i.ToString(CultureInfo.InvariantCulture)));
        await using (var select = Command(connection, null, $"SELECT event_id, patient_id FROM audit_event_patients WHERE event_id IN ({placeholders}) ORDER BY event_id, patient_id", ids))
        await using (var reader = await select.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false))
        {
            while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
            {
                patients[reader.GetString(0)].Add(reader.GetString(1));
            }
        }

        return [.. records.Select(r => r with { Patients = patients[r.Id] })];
    }
}
