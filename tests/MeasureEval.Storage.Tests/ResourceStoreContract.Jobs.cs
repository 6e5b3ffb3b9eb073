using MeasureEval.Core.Storage;
using MeasureEval.Storage.Common;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

/// <summary>The job table (<see cref="SqlJobStore"/>) in both providers: compare-and-set state changes, progress, the stored answer.</summary>
public abstract partial class ResourceStoreContract
{
    [SkippableFact]
    public async Task CreateAsync_NewJob_ReadsBackQueuedWithTimes()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);

        await jobs.CreateAsync("job1", "evaluate-measure", """{"a":1}""", """{"Sub":"s"}""", default);
        Time.Advance(TimeSpan.FromSeconds(3));
        await jobs.TryStartAsync("job1", default);

        var job = await jobs.GetAsync("job1", default);
        Assert.Equal(("evaluate-measure", """{"a":1}""", """{"Sub":"s"}""", JobState.Running, 1), (job!.Kind, job.Parameters, job.Claims, job.State, job.Attempts));
        // Times come from the injected TimeProvider, to the millisecond.
        Assert.Equal((Start, Start.AddSeconds(3)), (job.Created, job.Updated));
        Assert.Null(await jobs.GetAsync("other", default));
    }

    [SkippableFact]
    public async Task TryStartAsync_TwoWorkers_OnlyOneTakesTheJob()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);

        var taken = await Task.WhenAll(jobs.TryStartAsync("job1", default), jobs.TryStartAsync("job1", default));

        Assert.Equal(1, taken.Count(t => t));
        Assert.Empty(await jobs.ListAsync(JobState.Queued, 10, default));
        Assert.Single(await jobs.ListAsync(JobState.Running, 10, default));
    }

    [SkippableFact]
    public async Task TryRequeueAsync_RunningJob_QueuedAgainKeepingAttempts()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);
        await jobs.TryStartAsync("job1", default);
        await jobs.UpdateProgressAsync("job1", 40, 100, "patients", default);

        Assert.True(await jobs.TryRequeueAsync("job1", default));
        Assert.False(await jobs.TryRequeueAsync("job1", default));
        Assert.True(await jobs.TryStartAsync("job1", default));

        var job = await jobs.GetAsync("job1", default);
        // Run again from the beginning: the progress of the interrupted run is dropped, the attempt counted.
        Assert.Equal((JobState.Running, 2, 0L), (job!.State, job.Attempts, job.Done));
    }

    [SkippableFact]
    public async Task TryFinishAsync_RunningJob_StoresAnswerAndProgressStops()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);
        await jobs.TryStartAsync("job1", default);
        await jobs.UpdateProgressAsync("job1", 41_200, 100_000, "patients", default);
        var body = Enumerable.Range(0, 100_000).Select(i => (byte)(i % 251)).ToArray();

        Assert.True(await jobs.TryFinishAsync("job1", JobState.Completed, new JobResult(200, "application/fhir+json; charset=utf-8", body), default));
        await jobs.UpdateProgressAsync("job1", 1, 2, "patients", default);

        var job = await jobs.GetAsync("job1", default);
        Assert.Equal((JobState.Completed, 41_200L, 100_000L, "patients"), (job!.State, job.Done, job.Total, job.Unit));
        var result = await jobs.GetResultAsync("job1", default);
        Assert.Equal((200, "application/fhir+json; charset=utf-8"), (result!.Status, result.ContentType));
        Assert.Equal(body, result.GzipBody);
    }

    [SkippableFact]
    public async Task TryCancelAsync_FinishedOrRunning_DropsAnswerAndBlocksFinish()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("done", "k", "{}", "{}", default);
        await jobs.TryStartAsync("done", default);
        await jobs.TryFinishAsync("done", JobState.Failed, new JobResult(404, "application/fhir+json", [1, 2, 3]), default);
        await jobs.CreateAsync("busy", "k", "{}", "{}", default);
        await jobs.TryStartAsync("busy", default);

        Assert.True(await jobs.TryCancelAsync("done", default));
        Assert.True(await jobs.TryCancelAsync("busy", default));
        Assert.False(await jobs.TryCancelAsync("busy", default));
        Assert.False(await jobs.TryCancelAsync("unknown", default));

        Assert.Null(await jobs.GetResultAsync("done", default));
        // A worker finishing after the cancellation loses: nothing is stored.
        Assert.False(await jobs.TryFinishAsync("busy", JobState.Completed, new JobResult(200, "text/csv", [1]), default));
        Assert.Equal(JobState.Cancelled, (await jobs.GetAsync("busy", default))!.State);
    }

    [SkippableFact]
    public async Task CountPatientFactsAsync_PatientAndObservation_CountsOneEntry()
    {
        await using var store = await CreateStoreAsync();
        Assert.Equal(0, await store.CountPatientFactsAsync(default));
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c(), TestResources.CedarValley());

        // Ana's Patient and Observation share one entry; an Organization has none.
        Assert.Equal(1, await store.CountPatientFactsAsync(default));
    }
}
