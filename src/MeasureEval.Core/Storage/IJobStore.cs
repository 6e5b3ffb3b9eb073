namespace MeasureEval.Core.Storage;

/// <summary>Where an asynchronous job is. Queued and Running are live; the others are final.</summary>
public enum JobState
{
    Queued,
    Running,
    Completed,
    Failed,
    Cancelled,
}

/// <summary>
/// One asynchronous request: what to run (<see cref="Kind"/> and its parsed <see cref="Parameters"/>, JSON), who asked
/// (<see cref="Claims"/>, JSON: sub, role, payer), where it is, and how far (<see cref="Done"/> of <see cref="Total"/>
/// <see cref="Unit"/>). <see cref="Attempts"/> counts the runs started (a claim of an expired lease re-runs a job from
/// the beginning). A running job is held by <see cref="Owner"/> (a worker's id) until <see cref="LeaseUntil"/>.
/// </summary>
public sealed record JobRecord(
    string Id, string Kind, string Parameters, string Claims, JobState State, int Attempts, long Done, long Total, string? Unit,
    DateTimeOffset Created, DateTimeOffset Updated, string? Owner = null, DateTimeOffset? LeaseUntil = null);

/// <summary>How far a running job is: <see cref="Done"/> of <see cref="Total"/> (0: unknown) <see cref="Unit"/>.</summary>
public sealed record JobProgressSnapshot(long Done, long Total, string Unit);

/// <summary>A finished job's answer: status, content type and the body, gzip-compressed.</summary>
public sealed record JobResult(int Status, string ContentType, byte[] GzipBody);

/// <summary>
/// The table of asynchronous jobs, in the same database as the resources (both providers). State changes are
/// compare-and-set, so two workers (or a worker and a cancellation) never both win. A running job is leased: its worker
/// renews the lease while it runs; once the lease has expired (the worker's process died) any worker may claim the job.
/// Lease times come from the store's TimeProvider, so all nodes on one store must have roughly the same clock.
/// </summary>
public interface IJobStore
{
    /// <summary>Stores a new job (state <see cref="JobState.Queued"/>, no attempts, created = updated = now).</summary>
    System.Threading.Tasks.Task<JobRecord> CreateAsync(string id, string kind, string parameters, string claims, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<JobRecord?> GetAsync(string id, CancellationToken cancellationToken);

    /// <summary>Jobs in that state, oldest first.</summary>
    System.Threading.Tasks.Task<IReadOnlyList<JobRecord>> ListAsync(JobState state, int limit, CancellationToken cancellationToken);

    /// <summary>Jobs a worker may claim now: queued, or running with an expired lease; oldest first.</summary>
    System.Threading.Tasks.Task<IReadOnlyList<JobRecord>> ListClaimableAsync(int limit, CancellationToken cancellationToken);

    /// <summary>
    /// Queued, or Running with an expired lease → Running, held by <paramref name="owner"/> for <paramref name="lease"/>,
    /// counting an attempt and dropping the progress of an earlier run; false when the job was not claimable (another
    /// worker won, the lease is live, the job was cancelled or finished).
    /// </summary>
    System.Threading.Tasks.Task<bool> TryClaimAsync(string id, string owner, TimeSpan lease, CancellationToken cancellationToken);

    /// <summary>
    /// Extends <paramref name="owner"/>'s lease to now + <paramref name="lease"/>, saving the progress when given; false
    /// when the owner no longer holds the running job (cancelled, or claimed by another worker after the lease expired):
    /// the owner must then stop and store nothing.
    /// </summary>
    System.Threading.Tasks.Task<bool> TryRenewAsync(string id, string owner, TimeSpan lease, JobProgressSnapshot? progress, CancellationToken cancellationToken);

    /// <summary>
    /// Running (held by <paramref name="owner"/>) → <paramref name="state"/> (Completed or Failed) with its answer;
    /// false when the owner no longer holds it (cancelled, or claimed by another worker), in which case nothing is stored.
    /// </summary>
    System.Threading.Tasks.Task<bool> TryFinishAsync(string id, string owner, JobState state, JobResult result, CancellationToken cancellationToken);

    /// <summary>Deletes Completed, Failed and Cancelled jobs last changed before <paramref name="before"/>; returns how many.</summary>
    System.Threading.Tasks.Task<int> DeleteFinishedAsync(DateTimeOffset before, CancellationToken cancellationToken);

    /// <summary>Any state but Cancelled → Cancelled, dropping a stored answer; false when unknown or already cancelled.</summary>
    System.Threading.Tasks.Task<bool> TryCancelAsync(string id, CancellationToken cancellationToken);

    /// <summary>The answer of a Completed or Failed job, else null.</summary>
    System.Threading.Tasks.Task<JobResult?> GetResultAsync(string id, CancellationToken cancellationToken);
}
