using System.Net;
using System.Text;
using System.Text.Json;
using MeasureEval.Reliability.Tests.Support;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Hosting;
using Microsoft.Data.Sqlite;
using Xunit.Abstractions;

namespace MeasureEval.Reliability.Tests;

/// <summary>
/// The FHIR asynchronous request pattern (R4 async.html) end to end: kick-off (202 + Content-Location), polling (202 with
/// X-Progress and Retry-After), the result (the synchronous answer), cancellation (DELETE, then 404), callers who may
/// not see a job (404), and a SIGKILL of the real service while a job runs.
/// </summary>
public sealed class AsyncJobTests(ITestOutputHelper output) : IDisposable
{
    /// <summary>Large enough that a slowed job runs for seconds; small enough to generate and ingest in a few.</summary>
    private const int Patients = 2000;

    private readonly string _directory = Directory.CreateTempSubdirectory("measureeval-async-").FullName;

    /// <summary>Each patient of a job waits 3 ms (Jobs:PatientDelay, the test hook), so 2,000 patients take about 6 s; a 2 s lease.</summary>
    private static readonly Dictionary<string, string> SlowJobs = new()
    {
        ["Jobs__PatientDelay"] = "00:00:00.003",
        ["Jobs__PollInterval"] = "00:00:00.200",
        ["Jobs__RetryAfterSeconds"] = "1",
        // The killed process's lease runs out this soon, so the restarted one takes the job over quickly.
        ["Jobs__LeaseDuration"] = "00:00:02",
    };

    [Fact]
    public async Task RespondAsync_KickOffPollKillRestart_CompletesWithSynchronousResult()
    {
        var database = Path.Combine(_directory, "store.db");
        string synchronous;
        string synchronousType;
        Uri status;
        using (var service = await ServiceProcess.StartAsync(database, SlowJobs))
        {
            using var client = service.Client();
            var stored = await SyntheticPopulation.IngestAsync(client, Patients, Path.Combine(_directory, "ndjson"));
            output.WriteLine($"ingested {stored} resources of {Patients} patients");
            var measures = await MeasureIdsAsync(client);

            using (var sync = await client.SendAsync(EvaluateAll(measures)))
            {
                synchronous = await sync.Content.ReadAsStringAsync();
                Assert.True(sync.StatusCode == HttpStatusCode.OK, synchronous);
                synchronousType = sync.Content.Headers.ContentType!.ToString();
            }

            status = await AsyncPoller.KickOffAsync(client, EvaluateAll(measures));

            // Poll until the job has saved progress, then kill the service mid-job.
            PollAnswer running;
            var deadline = DateTime.UtcNow.AddSeconds(60);
            do
            {
                running = await AsyncPoller.PollOnceAsync(client, status);
                Assert.True(running.Status == HttpStatusCode.Accepted, $"before the kill: {(int)running.Status} {running.Body}");
                Assert.Equal("1", running.RetryAfter);
                Assert.NotNull(running.Progress);
                Assert.True(DateTime.UtcNow < deadline, $"no progress within 60 s: {running.Progress}");
                await Task.Delay(100);
            }
            while (AsyncPoller.Parse(running.Progress) is not { Done: > 0 } progress || progress.Done >= progress.Total);

            output.WriteLine($"killed at X-Progress: {running.Progress}");
            Assert.Equal(Patients, AsyncPoller.Parse(running.Progress)!.Value.Total);
            service.Kill();
        }

        using (var restarted = await ServiceProcess.StartAsync(database, SlowJobs))
        {
            using var client = restarted.Client();
            // The restarted process listens on another port: the same job path on its address.
            var (polls, final) = await AsyncPoller.PollUntilDoneAsync(client, new Uri(status.PathAndQuery.TrimStart('/'), UriKind.Relative), TimeSpan.FromSeconds(120));

            output.WriteLine($"after restart: {polls.Count} polls answered 202 ({string.Join(" | ", polls.Select(p => p.Progress).Distinct().Take(5))} …)");
            Assert.Contains(polls, p => AsyncPoller.Parse(p.Progress) is not null && p.RetryAfter == "1");
            Assert.True(final.Status == HttpStatusCode.OK, $"after restart: {(int)final.Status} {final.Body}");
            Assert.Equal(synchronousType, final.ContentType);
            // The restarted job ran again from the beginning over the same data: the same reports apart from ids and dates.
            Assert.Equal(AsyncPoller.Normalized(synchronous), AsyncPoller.Normalized(final.Body));
        }
    }

    [Fact]
    public async Task RespondAsync_CancelAndOtherCallers_AnswerNotFound()
    {
        using var factory = new ReliabilityApiFactory();
        using var host = factory.WithWebHostBuilder(b =>
        {
            b.UseSetting("Jobs:PatientDelay", "00:00:00.010");
            b.UseSetting("Jobs:PollInterval", "00:00:00.100");
        });
        using var loader = host.CreateClient();
        loader.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");
        await SyntheticPopulation.IngestAsync(loader, 500, Path.Combine(_directory, "ndjson"));
        using var starter = Client(host, "analyst", "analyst-a");
        using var other = Client(host, "analyst", "analyst-b");
        using var admin = Client(host, "admin", "admin-1");

        var status = await AsyncPoller.KickOffAsync(starter, new HttpRequestMessage(HttpMethod.Get, "Measure/$care-gaps-export?periodStart=2026-01-01&periodEnd=2026-12-31&_format=csv"));

        // Another caller (same role, other sub) neither sees nor cancels it; an admin sees it.
        await AssertCodeAsync(await other.GetAsync(status), HttpStatusCode.NotFound, "MEV-JOB-001");
        await AssertCodeAsync(await other.DeleteAsync(status), HttpStatusCode.NotFound, "MEV-JOB-001");
        Assert.Equal(HttpStatusCode.Accepted, (await AsyncPoller.PollOnceAsync(admin, status)).Status);

        // R4 async.html, delete request: 202 Accepted, later requests to the status URL 404 with an OperationOutcome
        // (from memory: verify; the same rule in the bulk-data derived Australian Health Connect IG, BatchRequestDelete).
        await AssertCodeAsync(await starter.DeleteAsync(status), HttpStatusCode.Accepted, "MEV-JOB-004");
        await AssertCodeAsync(await starter.GetAsync(status), HttpStatusCode.NotFound, "MEV-JOB-003");
        await AssertCodeAsync(await starter.DeleteAsync(status), HttpStatusCode.NotFound, "MEV-JOB-003");
        await AssertCodeAsync(await starter.GetAsync(new Uri(status, "00000000000000000000000000000000")), HttpStatusCode.NotFound, "MEV-JOB-001");
    }

    [Fact]
    public async Task RespondAsync_ExportAndFailure_AnswerAsTheSynchronousRequest()
    {
        using var factory = new ReliabilityApiFactory();
        using var host = factory.WithWebHostBuilder(b => b.UseSetting("Jobs:PollInterval", "00:00:00.100"));
        using var client = host.CreateClient();
        client.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");
        await SyntheticPopulation.IngestAsync(client, 300, Path.Combine(_directory, "ndjson"));
        const string export = "Measure/$care-gaps-export?periodStart=2026-01-01&periodEnd=2026-12-31&status=open-gap&status=closed-gap&_format=csv";

        using var sync = await client.GetAsync(new Uri(export, UriKind.Relative));
        var expected = await sync.Content.ReadAsStringAsync();
        var (_, final) = await AsyncPoller.PollUntilDoneAsync(client, await AsyncPoller.KickOffAsync(client, new HttpRequestMessage(HttpMethod.Get, export)), TimeSpan.FromSeconds(60));

        Assert.Equal(HttpStatusCode.OK, final.Status);
        Assert.Equal(sync.Content.Headers.ContentType!.ToString(), final.ContentType);
        Assert.True(expected.Split("\r\n").Length > 100, "the export should list many gaps");
        Assert.Equal(expected, final.Body);

        // A request that fails when it runs (unknown measure) ends with the synchronous 404 OperationOutcome.
        var unknown = await AsyncPoller.KickOffAsync(client, new HttpRequestMessage(HttpMethod.Get, "Measure/no-such-measure/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31"));
        var (_, failed) = await AsyncPoller.PollUntilDoneAsync(client, unknown, TimeSpan.FromSeconds(60));
        Assert.Equal(HttpStatusCode.NotFound, failed.Status);
        Assert.Contains("MEV-MEASURE-002", failed.Body, StringComparison.Ordinal);

        // Bad parameters are refused at kick-off, not queued.
        using var bad = new HttpRequestMessage(HttpMethod.Get, "Measure/$care-gaps?periodStart=not-a-date");
        bad.Headers.TryAddWithoutValidation("Prefer", "respond-async");
        await AssertCodeAsync(await client.SendAsync(bad), HttpStatusCode.BadRequest, "MEV-GAPS-001");
    }

    private static HttpClient Client(Microsoft.AspNetCore.Mvc.Testing.WebApplicationFactory<Program> host, string role, string subject)
    {
        var client = host.CreateClient();
        client.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", TestTokens.Mint(role, subject: subject));
        return client;
    }

    private static async Task AssertCodeAsync(HttpResponseMessage response, HttpStatusCode expected, string code)
    {
        using (response)
        {
            var body = await response.Content.ReadAsStringAsync();
            Assert.True(response.StatusCode == expected, $"expected {(int)expected} {code}, got {(int)response.StatusCode} {body}");
            Assert.Contains(code, body, StringComparison.Ordinal);
        }
    }

    private static HttpRequestMessage EvaluateAll(IReadOnlyList<string> measures)
    {
        var parameters = new StringBuilder("""{"resourceType":"Parameters","parameter":[{"name":"periodStart","valueDate":"2026-01-01"},{"name":"periodEnd","valueDate":"2026-12-31"}""");
        foreach (var id in measures)
        {
            parameters.Append($$""",{"name":"measureId","valueString":"{{id}}"}""");
        }

        return new HttpRequestMessage(HttpMethod.Post, "Measure/$evaluate-measure") { Content = Bundles.Content(parameters.Append("]}").ToString()) };
    }

    private static async Task<IReadOnlyList<string>> MeasureIdsAsync(HttpClient client)
    {
        using var response = await client.GetAsync(new Uri("Measure", UriKind.Relative));
        using var json = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        return [.. json.RootElement.GetProperty("entry").EnumerateArray().Select(e => e.GetProperty("resource").GetProperty("id").GetString()!)];
    }

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(_directory, recursive: true);
    }
}
