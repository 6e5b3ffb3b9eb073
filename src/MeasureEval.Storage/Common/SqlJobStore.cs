using System.Data.Common;
using System.Globalization;
using MeasureEval.Core.Storage;

namespace MeasureEval.Storage.Common;

/// <summary>
/// <see cref="IJobStore"/> over the <c>async_jobs</c> table of the store's database. Every change is one conditional
/// UPDATE (compare-and-set on the state, and for a running job on its owner and lease), run in its own write transaction
/// queued like a write session. Times are Unix milliseconds from the store's TimeProvider.
/// </summary>
public sealed class SqlJobStore(SqlResourceStore store) : IJobStore
{
    private const string Columns = "id, kind, parameters, claims, state, attempts, done, total, unit, created, updated, owner, lease_until";

    /// <summary>Queued, or running with a lease that has run out (NULL: running before leases existed).</summary>
    private const string Claimable = "(state = @queued OR (state = @running AND (lease_until IS NULL OR lease_until <= @now)))";

    public async System.Threading.Tasks.Task<JobRecord> CreateAsync(string id, string kind, string parameters, string claims, CancellationToken cancellationToken)
    {
        var now = store.TimeProvider.GetUtcNow().ToUnixTimeMilliseconds();
        await store.WriteAsync(
            (connection, transaction) => ExecuteAsync(
                connection, transaction,
                $"INSERT INTO async_jobs ({Columns}) VALUES (@p0, @p1, @p2, @p3, @p4, 0, 0, 0, NULL, @p5, @p5, NULL, NULL)",
                cancellationToken, id, kind, parameters, claims, Name(JobState.Queued), now),
            cancellationToken).ConfigureAwait(false);
        var at = DateTimeOffset.FromUnixTimeMilliseconds(now);
        return new JobRecord(id, kind, parameters, claims, JobState.Queued, 0, 0, 0, null, at, at);
    }

    public async System.Threading.Tasks.Task<JobRecord?> GetAsync(string id, CancellationToken cancellationToken)
    {
        var found = await QueryAsync($"SELECT {Columns} FROM async_jobs WHERE id = @p0", cancellationToken, id).ConfigureAwait(false);
        return found.Count == 0 ? null : found[0];
    }

    public System.Threading.Tasks.Task<IReadOnlyList<JobRecord>> ListAsync(JobState state, int limit, CancellationToken cancellationToken) =>
        QueryAsync($"SELECT {Columns} FROM async_jobs WHERE state = @p0 ORDER BY created, id LIMIT @p1", cancellationToken, Name(state), limit);

    public System.Threading.Tasks.Task<IReadOnlyList<JobRecord>> ListClaimableAsync(int limit, CancellationToken cancellationToken) =>
        QueryAsync(
            $"SELECT {Columns} FROM async_jobs WHERE {Named(Claimable, "@p0", "@p1", "@p2")} ORDER BY created, id LIMIT @p3",
            cancellationToken, Name(JobState.Queued), Name(JobState.Running), Now(), limit);

    public System.Threading.Tasks.Task<bool> TryClaimAsync(string id, string owner, TimeSpan lease, CancellationToken cancellationToken)
    {
        ArgumentException.ThrowIfNullOrEmpty(owner);
        var now = Now();
        return ChangeAsync(
            $"state = @p4, owner = @p1, lease_until = @p2, attempts = attempts + 1, done = 0, total = 0, unit = NULL, updated = @p5 WHERE id = @p0 AND {Named(Claimable, "@p3", "@p4", "@p5")}",
            cancellationToken, id, owner, now + (long)lease.TotalMilliseconds, Name(JobState.Queued), Name(JobState.Running), now);
    }

    public System.Threading.Tasks.Task<bool> TryRenewAsync(string id, string owner, TimeSpan lease, JobProgressSnapshot? progress, CancellationToken cancellationToken)
    {
        ArgumentException.ThrowIfNullOrEmpty(owner);
        var now = Now();
        return progress is null
            ? ChangeAsync(
                "lease_until = @p2, updated = @p3 WHERE id = @p0 AND owner = @p1 AND state = @p4",
                cancellationToken, id, owner, now + (long)lease.TotalMilliseconds, now, Name(JobState.Running))
            : ChangeAsync(
                "lease_until = @p2, updated = @p3, done = @p5, total = @p6, unit = @p7 WHERE id = @p0 AND owner = @p1 AND state = @p4",
                cancellationToken, id, owner, now + (long)lease.TotalMilliseconds, now, Name(JobState.Running), progress.Done, progress.Total, progress.Unit);
    }

    public System.Threading.Tasks.Task<bool> TryFinishAsync(string id, string owner, JobState state, JobResult result, CancellationToken cancellationToken)
    {
        ArgumentException.ThrowIfNullOrEmpty(owner);
        ArgumentNullException.ThrowIfNull(result);
        if (state is not (JobState.Completed or JobState.Failed))
        {
            throw new ArgumentOutOfRangeException(nameof(state), state, "a job finishes Completed or Failed");
        }

        return ChangeAsync(
            "state = @p1, result_status = @p2, result_type = @p3, result_body = @p4, updated = @p5 WHERE id = @p0 AND owner = @p6 AND state = @p7",
            cancellationToken, id, Name(state), result.Status, result.ContentType, result.GzipBody, Now(), owner, Name(JobState.Running));
    }

    public System.Threading.Tasks.Task<int> DeleteFinishedAsync(DateTimeOffset before, CancellationToken cancellationToken) =>
        store.WriteAsync(
            (connection, transaction) => ExecuteAsync(
                connection, transaction,
                "DELETE FROM async_jobs WHERE state IN (@p0, @p1, @p2) AND updated < @p3",
                cancellationToken, Name(JobState.Completed), Name(JobState.Failed), Name(JobState.Cancelled), before.ToUnixTimeMilliseconds()),
            cancellationToken);

    public System.Threading.Tasks.Task<bool> TryCancelAsync(string id, CancellationToken cancellationToken) =>
        ChangeAsync(
            "state = @p1, result_status = NULL, result_type = NULL, result_body = NULL, updated = @p2 WHERE id = @p0 AND state <> @p1",
            cancellationToken, id, Name(JobState.Cancelled), Now());

    public async System.Threading.Tasks.Task<JobResult?> GetResultAsync(string id, CancellationToken cancellationToken)
    {
        await using var connection = await store.OpenReaderAsync(cancellationToken).ConfigureAwait(false);
        await using var command = SqlResourceStore.Command(
            connection, null, "SELECT result_status, result_type, result_body FROM async_jobs WHERE id = @p0 AND result_status IS NOT NULL", id);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        return await reader.ReadAsync(cancellationToken).ConfigureAwait(false)
            ? new JobResult(reader.GetInt32(0), reader.GetString(1), reader.GetFieldValue<byte[]>(2))
            : null;
    }

    private static string Name(JobState state) => state.ToString().ToLowerInvariant();

    private static JobState Parse(string name) => Enum.Parse<JobState>(name, ignoreCase: true);

    private static string Named(string sql, string queued, string running, string now) =>
        sql.Replace("@queued", queued, StringComparison.Ordinal).Replace("@running", running, StringComparison.Ordinal).Replace("@now", now, StringComparison.Ordinal);

    private long Now() => store.TimeProvider.GetUtcNow().ToUnixTimeMilliseconds();

    private System.Threading.Tasks.Task<bool> ChangeAsync(string setAndWhere, CancellationToken cancellationToken, params object?[] values) =>
        store.WriteAsync(
            async (connection, transaction) => await ExecuteAsync(connection, transaction, "UPDATE async_jobs SET " + setAndWhere, cancellationToken, values).ConfigureAwait(false) == 1,
            cancellationToken);

    private static async System.Threading.Tasks.Task<int> ExecuteAsync(DbConnection connection, DbTransaction transaction, string sql, CancellationToken cancellationToken, params object?[] values)
    {
        await using var command = SqlResourceStore.Command(connection, transaction, sql, values);
        return await command.ExecuteNonQueryAsync(cancellationToken).ConfigureAwait(false);
    }

    private async System.Threading.Tasks.Task<IReadOnlyList<JobRecord>> QueryAsync(string sql, CancellationToken cancellationToken, params object?[] values)
    {
        await using var connection = await store.OpenReaderAsync(cancellationToken).ConfigureAwait(false);
        await using var command = SqlResourceStore.Command(connection, null, sql, values);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken).ConfigureAwait(false);
        var jobs = new List<JobRecord>();
        while (await reader.ReadAsync(cancellationToken).ConfigureAwait(false))
        {
            jobs.Add(new JobRecord(
                reader.GetString(0),
                reader.GetString(1),
                reader.GetString(2),
                reader.GetString(3),
                Parse(reader.GetString(4)),
                Convert.ToInt32(reader.GetValue(5), CultureInfo.InvariantCulture),
                reader.GetInt64(6),
                reader.GetInt64(7),
                reader.IsDBNull(8) ? null : reader.GetString(8),
                DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(9)),
                DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(10)),
                reader.IsDBNull(11) ? null : reader.GetString(11),
                reader.IsDBNull(12) ? null : DateTimeOffset.FromUnixTimeMilliseconds(reader.GetInt64(12))));
        }

        return jobs;
    }
}
