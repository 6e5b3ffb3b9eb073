using System.ComponentModel.DataAnnotations;

namespace MeasureEval.Api.Jobs;

/// <summary>The background worker that runs asynchronous requests (<c>Prefer: respond-async</c>).</summary>
public sealed class AsyncJobOptions
{
    public const string Section = "Jobs";

    /// <summary>Jobs run at the same time by this process; 0 runs none here (another process on the same store does).</summary>
    [Range(0, 64)]
    public int Workers { get; set; } = 1;

    /// <summary>Runs a job may start (a claim of an expired lease re-runs it from the beginning); then it is marked failed.</summary>
    [Range(1, 100)]
    public int MaxAttempts { get; set; } = 3;

    /// <summary>Seconds a poller is told to wait (Retry-After) while a job runs.</summary>
    [Range(1, 3600)]
    public int RetryAfterSeconds { get; set; } = 2;

    /// <summary>How often the worker looks for queued jobs it was not told about, and saves a running job's progress.</summary>
    [Range(typeof(TimeSpan), "00:00:00.050", "00:10:00")]
    public TimeSpan PollInterval { get; set; } = TimeSpan.FromSeconds(1);

    /// <summary>
    /// How long a running job stays held by its worker without a renewal. The worker renews at least every third of it
    /// (and at each progress save); once it has run out (the process died) any worker on the store takes the job over.
    /// A restarted process waits for this too, so short enough to resume soon, long enough to ride out a slow database.
    /// </summary>
    [Range(typeof(TimeSpan), "00:00:00.300", "01:00:00")]
    public TimeSpan LeaseDuration { get; set; } = TimeSpan.FromSeconds(30);

    /// <summary>How long a completed, failed or cancelled job (and its answer) is kept after it ended; then deleted.</summary>
    [Range(typeof(TimeSpan), "00:00:01", "365.00:00:00")]
    public TimeSpan Retention { get; set; } = TimeSpan.FromHours(24);

    /// <summary>
    /// Test and demonstration hook: a pause per patient in a job, so that a small population shows progress, can be
    /// cancelled or killed mid-way. Zero (the default) in production.
    /// </summary>
    [Range(typeof(TimeSpan), "00:00:00", "00:00:01")]
    public TimeSpan PatientDelay { get; set; } = TimeSpan.Zero;
}
