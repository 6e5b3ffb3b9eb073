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
/// <see cref="Unit"/>). <see cref="Attempts"/> counts the runs started (a restart re-runs a job from the beginning).
/// </summary>
public sealed record JobRecord(
    string Id, string Kind, string Parameters, string Claims, JobState State, int Attempts, long Done, long Total, string? Unit,
    DateTimeOffset Created, DateTimeOffset Updated);

/// <summary>A finished job's answer: status, content type and the body, gzip-compressed.</summary>
public sealed record JobResult(int Status, string ContentType, byte[] GzipBody);

/// <summary>
/// The table of asynchronous jobs, in the same database as the resources (both providers). State changes are
/// compare-and-set, so two workers (or a worker and a cancellation) never both win.
/// </summary>
public interface IJobStore
{
    /// <summary>Stores a new job (state <see cref="JobState.Queued"/>, no attempts, created = updated = now).</summary>
    System.Threading.Tasks.Task<JobRecord> CreateAsync(string id, string kind, string parameters, string claims, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<JobRecord?> GetAsync(string id, CancellationToken cancellationToken);

    /// <summary>Jobs in that state, oldest first.</summary>
    System.Threading.Tasks.Task<IReadOnlyList<JobRecord>> ListAsync(JobState state, int limit, CancellationToken cancellationToken);

    /// <summary>Queued → Running, counting an attempt; false when the job was not queued (taken, cancelled).</summary>
    System.Threading.Tasks.Task<bool> TryStartAsync(string id, CancellationToken cancellationToken);

    /// <summary>Running → Queued (after a restart); false when it was not running.</summary>
    System.Threading.Tasks.Task<bool> TryRequeueAsync(string id, CancellationToken cancellationToken);

    /// <summary>Progress of a running job; ignored once it is no longer running.</summary>
    System.Threading.Tasks.Task UpdateProgressAsync(string id, long done, long total, string unit, CancellationToken cancellationToken);

    /// <summary>
    /// Queued or Running → <paramref name="state"/> (Completed or Failed) with its answer; false when the job is no
    /// longer live (cancelled meanwhile), in which case nothing is stored.
    /// </summary>
    System.Threading.Tasks.Task<bool> TryFinishAsync(string id, JobState state, JobResult result, CancellationToken cancellationToken);

    /// <summary>Any state but Cancelled → Cancelled, dropping a stored answer; false when unknown or already cancelled.</summary>
    System.Threading.Tasks.Task<bool> TryCancelAsync(string id, CancellationToken cancellationToken);

    /// <summary>The answer of a Completed or Failed job, else null.</summary>
    System.Threading.Tasks.Task<JobResult?> GetResultAsync(string id, CancellationToken cancellationToken);
}
