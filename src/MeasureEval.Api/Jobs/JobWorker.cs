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
/// Runs queued jobs, at most <see cref="AsyncJobOptions.Workers"/> at once. On start, jobs left <c>running</c> by a
/// process that died are queued again (and run again from the beginning, over the data as it is then) or, once they
/// have used <see cref="AsyncJobOptions.MaxAttempts"/> runs, marked failed: a job is never silently lost.
/// </summary>
public sealed partial class JobWorker(
    IJobStore store, JobRunner runner, IOptions<AsyncJobOptions> options, ILogger<JobWorker> logger) : BackgroundService
{
    private readonly SemaphoreSlim _wake = new(0);
    private readonly ConcurrentDictionary<string, CancellationTokenSource> _running = new(StringComparer.Ordinal);

    /// <summary>A job was queued: look now rather than at the next poll.</summary>
    public void Wake()
    {
        if (_wake.CurrentCount == 0)
        {
            _wake.Release();
        }
    }

    /// <summary>Stops the job here if this process runs it (the store already says cancelled; another process notices at its next save).</summary>
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

        await RecoverAsync(settings, stoppingToken);
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
            // Host stopping: jobs still running stay "running" in the store and are queued again on the next start.
        }

        await Task.WhenAll(running);
    }

    private async Task RecoverAsync(AsyncJobOptions settings, CancellationToken cancellationToken)
    {
        foreach (var job in await store.ListAsync(JobState.Running, int.MaxValue, cancellationToken))
        {
            if (job.Attempts >= settings.MaxAttempts)
            {
                var outcome = FhirResult.Outcome([new FhirIssue(JobErrors.Abandoned, $"job {job.Id} was interrupted in each of its {job.Attempts} runs; start it again")]);
                await store.TryFinishAsync(job.Id, JobState.Failed, await runner.RenderAsync(outcome, FhirFormat.Default, JobCaller.Parse(job.Claims).ToPrincipal()), cancellationToken);
                LogAbandoned(job.Id, job.Attempts);
            }
            else if (await store.TryRequeueAsync(job.Id, cancellationToken))
            {
                LogRequeued(job.Id, job.Attempts);
            }
        }
    }

    /// <summary>The oldest queued job this worker manages to take (another process may take one first).</summary>
    private async Task<JobRecord> NextAsync(AsyncJobOptions settings, CancellationToken cancellationToken)
    {
        while (true)
        {
            try
            {
                foreach (var job in await store.ListAsync(JobState.Queued, 16, cancellationToken))
                {
                    if (await store.TryStartAsync(job.Id, cancellationToken))
                    {
                        return job with { State = JobState.Running, Attempts = job.Attempts + 1 };
                    }
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

    private async Task RunAsync(JobRecord job, AsyncJobOptions settings, SemaphoreSlim slots, CancellationToken stoppingToken)
    {
        using var cancel = CancellationTokenSource.CreateLinkedTokenSource(stoppingToken);
        _running[job.Id] = cancel;
        var progress = new JobProgress(settings.PatientDelay);
        using var saving = new CancellationTokenSource();
        var saver = SaveProgressAsync(job.Id, progress, settings.PollInterval, cancel, saving.Token);
        try
        {
            var caller = JobCaller.Parse(job.Claims).ToPrincipal();
            LogStarted(job.Id, job.Kind, job.Attempts);
            // Off the worker loop's thread: evaluation is CPU-bound and partly synchronous.
            var result = await Task.Run(() => runner.RunAsync(job, caller, progress, cancel.Token), cancel.Token);
            await saving.CancelAsync();
            await saver;
            await FinishAsync(job.Id, result.Status < 400 ? JobState.Completed : JobState.Failed, result);
        }
        catch (OperationCanceledException) when (cancel.IsCancellationRequested)
        {
            // Cancelled by DELETE (the store says so already) or by shutdown (left running, re-run on the next start).
            LogStopped(job.Id, stoppingToken.IsCancellationRequested);
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
            await saving.CancelAsync();
            await saver;
            _running.TryRemove(job.Id, out _);
            slots.Release();
        }
    }

    /// <summary>Stores the answer; if the database refuses, the job stays running in the store and runs again after the next start.</summary>
    private async Task FinishAsync(string id, JobState state, JobResult result)
    {
        try
        {
            LogFinished(id, result.Status, await store.TryFinishAsync(id, state, result, CancellationToken.None));
        }
        catch (DbException e)
        {
            LogStoreUnavailable(e.GetType().Name);
        }
    }

    /// <summary>Saves progress every interval; stops the job when the store says it was cancelled (by this or another process).</summary>
    private async Task SaveProgressAsync(string id, JobProgress progress, TimeSpan interval, CancellationTokenSource job, CancellationToken stop)
    {
        try
        {
            while (!stop.IsCancellationRequested)
            {
                await Task.Delay(interval, stop);
                if (progress.Latest is { } latest)
                {
                    await store.UpdateProgressAsync(id, latest.Done, latest.Total, latest.Unit, stop);
                }

                if (await store.GetAsync(id, stop) is { State: JobState.Cancelled })
                {
                    await job.CancelAsync();
                    return;
                }
            }
        }
        catch (OperationCanceledException)
        {
            // The job ended.
        }
        catch (DbException e)
        {
            // Progress is informative only; the job goes on and its answer is saved at the end.
            LogProgressNotSaved(id, e.GetType().Name);
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

    [LoggerMessage(Level = LogLevel.Warning, Message = "Job {JobId} was running when the service stopped; queued again (attempts so far {Attempts})")]
    private partial void LogRequeued(string jobId, int attempts);

    [LoggerMessage(Level = LogLevel.Error, Message = "Job {JobId} marked failed after {Attempts} interrupted attempts")]
    private partial void LogAbandoned(string jobId, int attempts);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Job table not reachable ({ExceptionType}); trying again")]
    private partial void LogStoreUnavailable(string exceptionType);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Progress of job {JobId} not saved ({ExceptionType})")]
    private partial void LogProgressNotSaved(string jobId, string exceptionType);
}
