using MeasureEval.Core.Storage;
using MeasureEval.Storage.Common;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

/// <summary>The job table (<see cref="SqlJobStore"/>) in both providers: compare-and-set claims and leases, progress, the stored answer, retention.</summary>
public abstract partial class ResourceStoreContract
{
    /// <summary>The default <c>Jobs:LeaseDuration</c>.</summary>
    private static readonly TimeSpan Lease = TimeSpan.FromSeconds(30);

    [SkippableFact]
    public async Task CreateAsync_NewJob_ReadsBackQueuedWithTimes()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);

        await jobs.CreateAsync("job1", "evaluate-measure", """{"a":1}""", """{"Sub":"s"}""", default);
        Assert.Null((await jobs.GetAsync("job1", default))!.Owner);
        Time.Advance(TimeSpan.FromSeconds(3));
        await jobs.TryClaimAsync("job1", "w1", Lease, default);

        var job = await jobs.GetAsync("job1", default);
        Assert.Equal(("evaluate-measure", """{"a":1}""", """{"Sub":"s"}""", JobState.Running, 1), (job!.Kind, job.Parameters, job.Claims, job.State, job.Attempts));
        // Times come from the injected TimeProvider, to the millisecond.
        Assert.Equal((Start, Start.AddSeconds(3)), (job.Created, job.Updated));
        Assert.Equal(("w1", Start.AddSeconds(33)), (job.Owner, job.LeaseUntil));
        Assert.Null(await jobs.GetAsync("other", default));
    }

    [SkippableFact]
    public async Task TryClaimAsync_TwoWorkers_OnlyOneTakesTheJob()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);

        var taken = await Task.WhenAll(jobs.TryClaimAsync("job1", "w1", Lease, default), jobs.TryClaimAsync("job1", "w2", Lease, default));

        Assert.Equal(1, taken.Count(t => t));
        var job = (await jobs.GetAsync("job1", default))!;
        Assert.Equal((JobState.Running, 1, taken[0] ? "w1" : "w2"), (job.State, job.Attempts, job.Owner));
        Assert.Empty(await jobs.ListClaimableAsync(10, default));
    }

    [SkippableFact]
    public async Task TryClaimAsync_LiveLease_NotClaimableAndRenewalExtendsIt()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);
        await jobs.TryClaimAsync("job1", "w1", Lease, default);

        Time.Advance(TimeSpan.FromSeconds(29));
        Assert.False(await jobs.TryClaimAsync("job1", "w2", Lease, default));
        Assert.True(await jobs.TryRenewAsync("job1", "w1", Lease, new JobProgressSnapshot(40, 100, "patients"), default));
        // 58 s after the claim, 29 s after the renewal: still held.
        Time.Advance(TimeSpan.FromSeconds(29));
        Assert.False(await jobs.TryClaimAsync("job1", "w2", Lease, default));
        Assert.Empty(await jobs.ListClaimableAsync(10, default));

        var job = (await jobs.GetAsync("job1", default))!;
        Assert.Equal(("w1", 1, 40L, 100L, "patients", Start.AddSeconds(59)), (job.Owner, job.Attempts, job.Done, job.Total, job.Unit, job.LeaseUntil));
    }

    [SkippableFact]
    public async Task TryClaimAsync_ExpiredLease_OtherWorkerTakesOverAndFirstLosesIt()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);
        await jobs.TryClaimAsync("job1", "w1", Lease, default);
        await jobs.TryRenewAsync("job1", "w1", Lease, new JobProgressSnapshot(40, 100, "patients"), default);

        Time.Advance(Lease);
        Assert.Equal(["job1"], (await jobs.ListClaimableAsync(10, default)).Select(j => j.Id));
        Assert.True(await jobs.TryClaimAsync("job1", "w2", Lease, default));
        Assert.False(await jobs.TryClaimAsync("job1", "w3", Lease, default));

        // The first worker's renewal and answer are refused: it must stop and store nothing.
        Assert.False(await jobs.TryRenewAsync("job1", "w1", Lease, null, default));
        Assert.False(await jobs.TryFinishAsync("job1", "w1", JobState.Completed, new JobResult(200, "text/csv", [1]), default));
        var job = (await jobs.GetAsync("job1", default))!;
        // Run again from the beginning: the progress of the cut-off run is dropped, the attempt counted.
        Assert.Equal(("w2", JobState.Running, 2, 0L, (string?)null), (job.Owner, job.State, job.Attempts, job.Done, job.Unit));
        Assert.Null(await jobs.GetResultAsync("job1", default));

        Assert.True(await jobs.TryFinishAsync("job1", "w2", JobState.Completed, new JobResult(200, "text/csv", [2]), default));
        Assert.Equal([2], (await jobs.GetResultAsync("job1", default))!.GzipBody);
        Assert.Empty(await jobs.ListClaimableAsync(10, default));
    }

    [SkippableFact]
    public async Task TryRenewAsync_ZeroLease_ClaimableAtOnce()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);
        await jobs.TryClaimAsync("job1", "w1", Lease, default);

        // What a worker does when its process stops: the restarted process need not wait for the lease to run out.
        Assert.True(await jobs.TryRenewAsync("job1", "w1", TimeSpan.Zero, null, default));

        Assert.True(await jobs.TryClaimAsync("job1", "w2", Lease, default));
    }

    [SkippableFact]
    public async Task DeleteFinishedAsync_PastRetention_DeletesEndedJobsOnly()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        foreach (var id in new[] { "old-done", "old-failed", "old-cancelled", "old-running", "old-queued", "new-done" })
        {
            await jobs.CreateAsync(id, "k", "{}", "{}", default);
        }

        await jobs.TryClaimAsync("old-done", "w1", Lease, default);
        await jobs.TryFinishAsync("old-done", "w1", JobState.Completed, new JobResult(200, "text/csv", [1]), default);
        await jobs.TryClaimAsync("old-failed", "w1", Lease, default);
        await jobs.TryFinishAsync("old-failed", "w1", JobState.Failed, new JobResult(404, "text/csv", [1]), default);
        await jobs.TryCancelAsync("old-cancelled", default);
        await jobs.TryClaimAsync("old-running", "w1", Lease, default);
        Time.Advance(TimeSpan.FromHours(2));
        await jobs.TryClaimAsync("new-done", "w1", Lease, default);
        await jobs.TryFinishAsync("new-done", "w1", JobState.Completed, new JobResult(200, "text/csv", [1]), default);

        Assert.Equal(3, await jobs.DeleteFinishedAsync(Time.GetUtcNow().AddHours(-1), default));

        Assert.Null(await jobs.GetAsync("old-done", default));
        Assert.Null(await jobs.GetAsync("old-failed", default));
        Assert.Null(await jobs.GetAsync("old-cancelled", default));
        Assert.Null(await jobs.GetResultAsync("old-done", default));
        Assert.NotNull(await jobs.GetAsync("old-running", default));
        Assert.NotNull(await jobs.GetAsync("old-queued", default));
        Assert.NotNull(await jobs.GetResultAsync("new-done", default));
    }

    [SkippableFact]
    public async Task TryFinishAsync_RunningJob_StoresAnswerAndProgressStops()
    {
        await using var store = await CreateStoreAsync();
        var jobs = new SqlJobStore(store);
        await jobs.CreateAsync("job1", "k", "{}", "{}", default);
        await jobs.TryClaimAsync("job1", "w1", Lease, default);
        await jobs.TryRenewAsync("job1", "w1", Lease, new JobProgressSnapshot(41_200, 100_000, "patients"), default);
        var body = Enumerable.Range(0, 100_000).Select(i => (byte)(i % 251)).ToArray();

        Assert.True(await jobs.TryFinishAsync("job1", "w1", JobState.Completed, new JobResult(200, "application/fhir+json; charset=utf-8", body), default));
        Assert.False(await jobs.TryRenewAsync("job1", "w1", Lease, new JobProgressSnapshot(1, 2, "patients"), default));

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
        await jobs.TryClaimAsync("done", "w1", Lease, default);
        await jobs.TryFinishAsync("done", "w1", JobState.Failed, new JobResult(404, "application/fhir+json", [1, 2, 3]), default);
        await jobs.CreateAsync("busy", "k", "{}", "{}", default);
        await jobs.TryClaimAsync("busy", "w1", Lease, default);

        Assert.True(await jobs.TryCancelAsync("done", default));
        Assert.True(await jobs.TryCancelAsync("busy", default));
        Assert.False(await jobs.TryCancelAsync("busy", default));
        Assert.False(await jobs.TryCancelAsync("unknown", default));

        Assert.Null(await jobs.GetResultAsync("done", default));
        // A worker finishing after the cancellation loses: nothing is stored.
        Assert.False(await jobs.TryFinishAsync("busy", "w1", JobState.Completed, new JobResult(200, "text/csv", [1]), default));
        Assert.False(await jobs.TryRenewAsync("busy", "w1", Lease, null, default));
        Assert.Equal(JobState.Cancelled, (await jobs.GetAsync("busy", default))!.State);
    }

    [SkippableFact]
    public async Task CountPatientFactsAsync_PatientAndObservation_CountsOneEntry()
    {
        await using var store = await CreateStoreAsync();
        Assert.Equal(0, await store.CountPatientFactsAsync(MeasureEval.Core.Security.DataScope.Unrestricted, default));
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c(), TestResources.CedarValley());

        // Ana's Patient and Observation share one entry; an Organization has none.
        Assert.Equal(1, await store.CountPatientFactsAsync(MeasureEval.Core.Security.DataScope.Unrestricted, default));
    }
}
