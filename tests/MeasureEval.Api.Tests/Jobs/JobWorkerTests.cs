using System.Collections.Concurrent;
using System.Net;
using System.Text;
using MeasureEval.Api.Jobs;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Tests.Jobs;

/// <summary>
/// The worker in-process: a finished job is deleted once its retention has passed, as its Expires said; a worker whose
/// lease was taken over while the database was away stops and stores nothing.
/// </summary>
public sealed class JobWorkerTests : IClassFixture<JobWorkerTests.ShortRetention>, IClassFixture<JobWorkerTests.FlakyJobTable>
{
    private const string Evaluate = "/Measure/influenza-vaccination/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31";

    private readonly ShortRetention _factory;
    private readonly FlakyJobTable _flaky;

    public JobWorkerTests(ShortRetention factory, FlakyJobTable flaky)
    {
        _factory = factory;
        _flaky = flaky;
    }

    [Fact]
    public async Task RenewLease_TakenOverDuringOutage_WorkerStopsAndStoresNothing()
    {
        using var client = _flaky.CreateClient();
        var bundle = await File.ReadAllTextAsync(Path.Combine(DemoFolder(), "bundle-0001.json"));
        using (var content = new StringContent(bundle, Encoding.UTF8, "application/fhir+json"))
        using (var stored = await client.PostAsync(new Uri("/", UriKind.Relative), content))
        {
            Assert.True(stored.IsSuccessStatusCode, $"ingest: {(int)stored.StatusCode}");
        }

        using var kickOff = new HttpRequestMessage(HttpMethod.Get, Evaluate);
        kickOff.Headers.TryAddWithoutValidation("Prefer", "respond-async");
        using var accepted = await client.SendAsync(kickOff);
        var id = accepted.Content.Headers.ContentLocation!.Segments[^1];
        var jobs = _flaky.Table;
        var deadline = DateTime.UtcNow.AddSeconds(60);
        while ((await jobs.Inner.GetAsync(id, default))!.Done == 0)
        {
            Assert.True(DateTime.UtcNow < deadline, "no progress within 60 s");
            await Task.Delay(50);
        }

        // The job table fails this worker's renewals until its 1 s lease has run out; another worker then claims the job.
        jobs.Down = true;
        var owner = (await jobs.Inner.GetAsync(id, default))!.Owner;
        await Task.Delay(TimeSpan.FromSeconds(1.5));
        // A renewal already under way when the outage began may still commit; its lease then runs out a little later.
        while (!await jobs.Inner.TryClaimAsync(id, "other-node", TimeSpan.FromMinutes(5), default))
        {
            Assert.True(DateTime.UtcNow < deadline, "the lease never ran out");
            await Task.Delay(100);
        }

        jobs.Down = false;

        // 50 patients at 100 ms each: the first run would have ended by now had it not stopped.
        await Task.Delay(TimeSpan.FromSeconds(6));
        var job = (await jobs.Inner.GetAsync(id, default))!;
        Assert.Equal(("other-node", JobState.Running, 2), (job.Owner, job.State, job.Attempts));
        Assert.DoesNotContain(owner, jobs.Finishers);
        Assert.Null(await jobs.Inner.GetResultAsync(id, default));
        Assert.True(jobs.RefusedRenewals > 0, "the first worker never learned it lost the lease");
    }

    [Fact]
    public async Task CleanUp_FinishedJobPastRetention_StatusUrlAnswersUnknown()
    {
        using var client = _factory.CreateClient();
        var before = DateTimeOffset.UtcNow;
        var (answer, status) = await AsyncPolling.KickOffAndWaitAsync(client, Evaluate);
        Assert.Equal(HttpStatusCode.OK, answer.StatusCode);
        // Expires (RFC 9111 §5.3, an HTTP-date, whole seconds): when the job ended plus Jobs:Retention (2 s here).
        var expires = answer.Content.Headers.Expires;
        Assert.NotNull(expires);
        Assert.InRange(expires.Value, before.AddSeconds(1), DateTimeOffset.UtcNow.AddSeconds(3));
        answer.Dispose();

        var deadline = DateTime.UtcNow.AddSeconds(60);
        HttpResponseMessage gone;
        while ((gone = await client.GetAsync(status)).StatusCode == HttpStatusCode.OK)
        {
            Assert.True(DateTime.UtcNow < deadline, "the job was not deleted within 60 s");
            await Task.Delay(200);
        }

        Assert.True(DateTimeOffset.UtcNow >= expires.Value.AddSeconds(-1), "deleted before its Expires");
        Assert.Equal(HttpStatusCode.NotFound, gone.StatusCode);
        Assert.Contains("MEV-JOB-001", await gone.Content.ReadAsStringAsync(), StringComparison.Ordinal);
        gone.Dispose();
    }

    public sealed class ShortRetention : ApiFactory
    {
        protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>
        {
            ["Jobs:Retention"] = "00:00:02",
            ["Jobs:PollInterval"] = "00:00:00.100",
        };
    }

    /// <summary>A 1 s lease; each patient of a job waits 100 ms, on one evaluation thread, so a job runs for seconds.</summary>
    public sealed class FlakyJobTable : ApiFactory
    {
        public OutageJobStore Table { get; private set; } = null!;

        protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>
        {
            ["Jobs:LeaseDuration"] = "00:00:01",
            ["Jobs:PollInterval"] = "00:00:00.100",
            ["Jobs:PatientDelay"] = "00:00:00.100",
            ["Evaluation:Workers"] = "1",
        };

        protected override void ConfigureWebHost(IWebHostBuilder builder)
        {
            base.ConfigureWebHost(builder);
            builder.ConfigureTestServices(services =>
            {
                var original = services.Last(d => d.ServiceType == typeof(IJobStore));
                services.Remove(original);
                services.AddSingleton<IJobStore>(s => Table = new OutageJobStore((IJobStore)original.ImplementationFactory!(s)));
            });
        }
    }

    /// <summary>The job table, with renewals failing as in a database outage while <see cref="Down"/>; records who stored an answer.</summary>
    public sealed class OutageJobStore(IJobStore inner) : IJobStore
    {
        private int _refused;

        public IJobStore Inner => inner;

        public volatile bool Down;

        public ConcurrentBag<string> Finishers { get; } = [];

        public int RefusedRenewals => Volatile.Read(ref _refused);

        public Task<JobRecord> CreateAsync(string id, string kind, string parameters, string claims, CancellationToken cancellationToken) => inner.CreateAsync(id, kind, parameters, claims, cancellationToken);

        public Task<JobRecord?> GetAsync(string id, CancellationToken cancellationToken) => inner.GetAsync(id, cancellationToken);

        public Task<IReadOnlyList<JobRecord>> ListAsync(JobState state, int limit, CancellationToken cancellationToken) => inner.ListAsync(state, limit, cancellationToken);

        public Task<IReadOnlyList<JobRecord>> ListClaimableAsync(int limit, CancellationToken cancellationToken) => inner.ListClaimableAsync(limit, cancellationToken);

        public Task<bool> TryClaimAsync(string id, string owner, TimeSpan lease, CancellationToken cancellationToken) => inner.TryClaimAsync(id, owner, lease, cancellationToken);

        public async Task<bool> TryRenewAsync(string id, string owner, TimeSpan lease, JobProgressSnapshot? progress, CancellationToken cancellationToken)
        {
            if (Down)
            {
                throw new SqliteException("database is away (test)", 10);
            }

            var renewed = await inner.TryRenewAsync(id, owner, lease, progress, cancellationToken);
            if (!renewed)
            {
                Interlocked.Increment(ref _refused);
            }

            return renewed;
        }

        public Task<bool> TryFinishAsync(string id, string owner, JobState state, JobResult result, CancellationToken cancellationToken)
        {
            Finishers.Add(owner);
            return inner.TryFinishAsync(id, owner, state, result, cancellationToken);
        }

        public Task<int> DeleteFinishedAsync(DateTimeOffset before, CancellationToken cancellationToken) => inner.DeleteFinishedAsync(before, cancellationToken);

        public Task<bool> TryCancelAsync(string id, CancellationToken cancellationToken) => inner.TryCancelAsync(id, cancellationToken);

        public Task<JobResult?> GetResultAsync(string id, CancellationToken cancellationToken) => inner.GetResultAsync(id, cancellationToken);
    }

    private static string DemoFolder()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            var candidate = Path.Combine(dir.FullName, "fhir-bundles", "demo");
            if (Directory.Exists(candidate))
            {
                return candidate;
            }
        }

        throw new DirectoryNotFoundException("fhir-bundles/demo not found above the test output");
    }
}
