using System.Collections.Concurrent;
using System.Data.Common;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Core.Storage;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Jobs;

/// <summary>
/// Runs queued jobs, at most <see cref="AsyncJobOptions.Workers"/> at once, under a lease held in the store by this
/// process's <see cref="NodeId"/> and renewed while the job runs. Several processes on one store share the queue: each
/// job is claimed by one of them (compare-and-set). A job whose lease ran out (its process died) is claimed like a queued
/// one and runs again from the beginning, over the data as it is then, or, once it has used
/// <see cref="AsyncJobOptions.MaxAttempts"/> runs, is marked failed: a job is never silently lost, nor run by two live
/// processes at once. The worker also deletes jobs that ended more than <see cref="AsyncJobOptions.Retention"/> ago.
/// </summary>
public sealed partial class JobWorker(
    IJobStore store, JobRunner runner, IOptions<AsyncJobOptions> options, TimeProvider time, ILogger<JobWorker> logger) : BackgroundService
{
    /// <summary>How often ended jobs are looked for (or every retention, if shorter): retention is hours, a minute late is nothing.</summary>
    private static readonly TimeSpan CleanupInterval = TimeSpan.FromMinutes(1);

    private readonly SemaphoreSlim _wake = new(0);
    private readonly ConcurrentDictionary<string, CancellationTokenSource> _running = new(StringComparer.Ordinal);
    private DateTimeOffset _nextCleanup = DateTimeOffset.MinValue;

    /// <summary>This process's worker id, the owner of the leases it holds; new at every start.</summary>
    public string NodeId { get; } = Guid.NewGuid().ToString("N");

    /// <summary>A job was queued: look now rather than at the next poll.</summary>
    public void Wake()
    {
        if (_wake.CurrentCount == 0)
        {
            _wake.Release();
        }
    }

    /// <summary>Stops the job here if this process runs it (the store already says cancelled; another process notices at its next renewal).</summary>
    public void CancelLocal(string id)
    {
        if (_running.TryGetValue(id, out var cancel))
        {
            cancel.Cancel();
        }
    }

    public override void Dispose()
    {
        _wake.Dispose();
        base.Dispose();
    }

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        var settings = options.Value;
        if (settings.Workers == 0)
        {
            return;
        }

        using var slots = new SemaphoreSlim(settings.Workers);
        var running = new List<Task>();
        try
        {
            while (!stoppingToken.IsCancellationRequested)
            {
                await slots.WaitAsync(stoppingToken);
                var job = await NextAsync(settings, stoppingToken);
                running.RemoveAll(t => t.IsCompleted);
                running.Add(RunAsync(job, settings, slots, stoppingToken));
            }
        }
        catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
        {
            // Host stopping: running jobs give their leases up (RunAsync) and are claimed again by the next worker.
        }

        await Task.WhenAll(running);
    }

    /// <summary>
    /// The oldest claimable job this worker manages to claim (another process may claim it first). A job whose earlier
    /// run was cut off and which has used its attempts is claimed only to be marked failed.
    /// </summary>
    private async Task<JobRecord> NextAsync(AsyncJobOptions settings, CancellationToken cancellationToken)
    {
        while (true)
        {
            try
            {
                await CleanUpAsync(settings, cancellationToken);
                foreach (var job in await store.ListClaimableAsync(16, cancellationToken))
                {
                    if (!await store.TryClaimAsync(job.Id, NodeId, settings.LeaseDuration, cancellationToken))
                    {
                        continue;
                    }

                    if (job.State == JobState.Running && job.Attempts >= settings.MaxAttempts)
                    {
                        var outcome = FhirResult.Outcome([new FhirIssue(JobErrors.Abandoned, $"job {job.Id} was interrupted in each of its {job.Attempts} runs; start it again")]);
                        await store.TryFinishAsync(job.Id, NodeId, JobState.Failed, await runner.RenderAsync(outcome, FhirFormat.Default, JobCaller.Parse(job.Claims).ToPrincipal()), cancellationToken);
                        LogAbandoned(job.Id, job.Attempts);
                        continue;
                    }

                    if (job.State == JobState.Running)
                    {
                        LogTakenOver(job.Id, job.Attempts);
                    }

                    return job with { State = JobState.Running, Attempts = job.Attempts + 1, Done = 0, Total = 0, Unit = null, Owner = NodeId };
                }
            }
            catch (DbException e)
            {
                // The database is away for a moment (a PostgreSQL restart): the worker waits and looks again, it does not stop the host.
                LogStoreUnavailable(e.GetType().Name);
            }

            await _wake.WaitAsync(settings.PollInterval, cancellationToken);
        }
    }

    /// <summary>
    /// Deletes jobs that ended more than the retention ago, at most once per <see cref="CleanupInterval"/>; only while
    /// looking for work, so a worker with every slot busy deletes later.
    /// </summary>
    private async Task CleanUpAsync(AsyncJobOptions settings, CancellationToken cancellationToken)
    {
        var now = time.GetUtcNow();
        if (now < _nextCleanup)
        {
            return;
        }

        _nextCleanup = now + (settings.Retention < CleanupInterval ? settings.Retention : CleanupInterval);
        if (await store.DeleteFinishedAsync(now - settings.Retention, cancellationToken) is > 0 and var deleted)
        {
            LogDeleted(deleted);
        }
    }

    private async Task RunAsync(JobRecord job, AsyncJobOptions settings, SemaphoreSlim slots, CancellationToken stoppingToken)
    {
        using var cancel = CancellationTokenSource.CreateLinkedTokenSource(stoppingToken);
        _running[job.Id] = cancel;
        var progress = new JobProgress(settings.PatientDelay);
        using var renewing = new CancellationTokenSource();
        var renewer = RenewLeaseAsync(job.Id, progress, settings, cancel, renewing.Token);
        try
        {
            var caller = JobCaller.Parse(job.Claims).ToPrincipal();
            LogStarted(job.Id, job.Kind, job.Attempts);
            // Off the worker loop's thread: evaluation is CPU-bound and partly synchronous.
            var result = await Task.Run(() => runner.RunAsync(job, caller, progress, cancel.Token), cancel.Token);
            await renewing.CancelAsync();
            await renewer;
            await FinishAsync(job.Id, result.Status < 400 ? JobState.Completed : JobState.Failed, result);
        }
        catch (OperationCanceledException) when (cancel.IsCancellationRequested)
        {
            // Cancelled by DELETE, the lease lost to another worker (the store says so already), or shutdown.
            LogStopped(job.Id, stoppingToken.IsCancellationRequested);
            if (stoppingToken.IsCancellationRequested)
            {
                await ReleaseAsync(job.Id);
            }
        }
        catch (Exception e)
        {
            // Logged by type only: messages can carry data. The caller gets the 500 the synchronous request would have given.
            LogFailed(job.Id, e.GetType().Name);
            var outcome = FhirResult.Outcome([new FhirIssue(ErrorCatalogue.Unexpected, $"job {job.Id} failed unexpectedly; quote this job id")]);
            await FinishAsync(job.Id, JobState.Failed, await runner.RenderAsync(outcome, FhirFormat.Default, JobCaller.Parse(job.Claims).ToPrincipal()));
        }
        finally
        {
            await renewing.CancelAsync();
            await renewer;
            _running.TryRemove(job.Id, out _);
            slots.Release();
        }
    }

    /// <summary>
    /// Stores the answer if this worker still holds the job; if the database refuses, the lease runs out and the job
    /// runs again on some worker.
    /// </summary>
    private async Task FinishAsync(string id, JobState state, JobResult result)
    {
        try
        {
            LogFinished(id, result.Status, await store.TryFinishAsync(id, NodeId, state, result, CancellationToken.None));
        }
        catch (DbException e)
        {
            LogStoreUnavailable(e.GetType().Name);
        }
    }

    /// <summary>On shutdown: ends the lease now, so the next worker (this process restarted, or another) claims the job without waiting.</summary>
    private async Task ReleaseAsync(string id)
    {
        try
        {
            await store.TryRenewAsync(id, NodeId, TimeSpan.Zero, null, CancellationToken.None);
        }
        catch (DbException e)
        {
            // The lease then simply runs out.
            LogStoreUnavailable(e.GetType().Name);
        }
    }

    /// <summary>
    /// Renews the lease with the latest progress every poll interval (at least every third of the lease); stops the job
    /// when the renewal is refused: cancelled (by this or another process) or claimed by another worker.
    /// </summary>
    private async Task RenewLeaseAsync(string id, JobProgress progress, AsyncJobOptions settings, CancellationTokenSource job, CancellationToken stop)
    {
        var interval = TimeSpan.FromTicks(Math.Min(settings.PollInterval.Ticks, settings.LeaseDuration.Ticks / 3));
        while (!stop.IsCancellationRequested)
        {
            try
            {
                await Task.Delay(interval, stop);
                var snapshot = progress.Latest is { } latest ? new JobProgressSnapshot(latest.Done, latest.Total, latest.Unit) : null;
                if (!await store.TryRenewAsync(id, NodeId, settings.LeaseDuration, snapshot, stop))
                {
                    LogLeaseLost(id);
                    await job.CancelAsync();
                    return;
                }
            }
            catch (OperationCanceledException)
            {
                // The job ended.
                return;
            }
            catch (DbException e)
            {
                // Tried again at the next interval; if the lease runs out meanwhile another worker may claim the job,
                // and then this run's renewal and answer are refused.
                LogLeaseNotRenewed(id, e.GetType().Name);
            }
        }
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Job {JobId} ({Kind}) started, attempt {Attempt}")]
    private partial void LogStarted(string jobId, string kind, int attempt);

    [LoggerMessage(Level = LogLevel.Information, Message = "Job {JobId} finished with status {Status} (saved: {Saved})")]
    private partial void LogFinished(string jobId, int status, bool saved);

    [LoggerMessage(Level = LogLevel.Information, Message = "Job {JobId} stopped (shutdown: {Shutdown})")]
    private partial void LogStopped(string jobId, bool shutdown);

    [LoggerMessage(Level = LogLevel.Error, Message = "Job {JobId} failed with {ExceptionType}")]
    private partial void LogFailed(string jobId, string exceptionType);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Job {JobId}: the lease of its last run expired; running it again (attempts so far {Attempts})")]
    private partial void LogTakenOver(string jobId, int attempts);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Job {JobId} stopped here: cancelled or claimed by another worker")]
    private partial void LogLeaseLost(string jobId);

    [LoggerMessage(Level = LogLevel.Information, Message = "Deleted {Count} ended jobs past their retention")]
    private partial void LogDeleted(int count);

    [LoggerMessage(Level = LogLevel.Error, Message = "Job {JobId} marked failed after {Attempts} interrupted attempts")]
    private partial void LogAbandoned(string jobId, int attempts);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Job table not reachable ({ExceptionType}); trying again")]
    private partial void LogStoreUnavailable(string exceptionType);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Lease of job {JobId} not renewed ({ExceptionType}); trying again")]
    private partial void LogLeaseNotRenewed(string jobId, string exceptionType);
}
