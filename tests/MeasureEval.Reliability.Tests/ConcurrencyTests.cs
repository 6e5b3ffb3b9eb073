using System.Net;
using System.Text.Json;
using MeasureEval.Reliability.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Reliability.Tests;

/// <summary>Eight ingest clients racing on the same and on different patients while a summary evaluation runs.</summary>
public sealed class ConcurrencyTests : IClassFixture<ReliabilityApiFactory>, IClassFixture<PostgresServer>
{
    private const int Clients = 8;
    private const int BundlesPerClient = 200;
    private const int SharedPatients = 25;
    private readonly ReliabilityApiFactory _factory;
    private readonly PostgresServer _postgres;

    public ConcurrencyTests(ReliabilityApiFactory factory, PostgresServer postgres)
    {
        _factory = factory;
        _postgres = postgres;
    }

    [Fact]
    public Task ConcurrentIngestAndEvaluation_EveryResourceOnceAndNo5xx() => RunScenarioAsync(_factory);

    /// <summary>
    /// PostgreSQL sessions run concurrently at READ COMMITTED: without the advisory lock on the ifNoneExist condition,
    /// two clients both saw no shared patient and both created it.
    /// </summary>
    [SkippableFact]
    public async Task ConcurrentIngestAndEvaluation_Postgres_EachConditionalPatientOnce()
    {
        Skip.IfNot(_postgres.IsAvailable, _postgres.UnavailableReason);
        using var factory = ReliabilityApiFactory.OnPostgres(await _postgres.CreateSchemaAsync());
        await RunScenarioAsync(factory);
    }

    private static async Task RunScenarioAsync(ReliabilityApiFactory factory)
    {
        using var evaluator = factory.Client();
        var measureId = await FirstMeasureIdAsync(evaluator);
        using var stop = new CancellationTokenSource();
        var evaluations = EvaluateLoopAsync(evaluator, measureId, stop.Token);
        var ingests = Enumerable.Range(0, Clients).Select(c => Task.Run(() => IngestAsync(factory, c))).ToArray();
        await Task.WhenAll(ingests);
        await stop.CancelAsync();
        var evaluated = await evaluations;
        Assert.True(evaluated > 0, "no evaluation ran during the ingest");

        using var client = factory.Client();
        // Every client created the same shared patients by ifNoneExist: each must exist exactly once.
        for (var p = 0; p < SharedPatients; p++)
        {
            Assert.Equal(1, await TotalAsync(client, $"Patient?identifier={Bundles.MrnSystem}|shared-{p}&_count=0"));
        }

        // Patients of one client only (different patients), each written by PUT.
        Assert.Equal(Clients * BundlesPerClient / 4, await TotalAsync(client, "Patient?_count=0") - SharedPatients);
        // One observation per ifNoneExist bundle (3 in 4) plus three per PUT bundle (1 in 4).
        Assert.Equal((Clients * BundlesPerClient * 3 / 4) + (Clients * BundlesPerClient / 4 * 3), await TotalAsync(client, "Observation?_count=0"));
    }

    private static async Task IngestAsync(ReliabilityApiFactory factory, int clientNumber)
    {
        using var client = factory.Client();
        for (var b = 0; b < BundlesPerClient; b++)
        {
            // Three in four bundles race on a shared patient (ifNoneExist) and add two observations; one in four PUTs the client's own patient with three.
            var body = b % 4 == 3
                ? Bundles.PutTransaction($"c{clientNumber}-b{b}", 3)
                : Bundles.ConditionalTransaction($"shared-{b % SharedPatients}", $"c{clientNumber}-b{b}-bp");
            using var response = await client.PostAsync(new Uri("/", UriKind.Relative), Bundles.Content(body));
            Assert.True(response.StatusCode == HttpStatusCode.OK, $"client {clientNumber} bundle {b}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
        }
    }

    private static async Task<int> EvaluateLoopAsync(HttpClient client, string measureId, CancellationToken cancellationToken)
    {
        var runs = 0;
        while (!cancellationToken.IsCancellationRequested)
        {
            using var response = await client.GetAsync(new Uri($"Measure/{measureId}/$evaluate-measure?periodStart=2024-01-01&periodEnd=2024-12-31", UriKind.Relative), CancellationToken.None);
            Assert.True((int)response.StatusCode < 500, $"evaluation during ingest: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync(CancellationToken.None)}");
            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
            runs++;
        }

        return runs;
    }

    private static async Task<string> FirstMeasureIdAsync(HttpClient client)
    {
        using var response = await client.GetAsync(new Uri("Measure", UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        using var json = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        return json.RootElement.GetProperty("entry")[0].GetProperty("resource").GetProperty("id").GetString()!;
    }

    private static async Task<int> TotalAsync(HttpClient client, string query)
    {
        using var response = await client.GetAsync(new Uri(query, UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        using var json = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        return json.RootElement.GetProperty("total").GetInt32();
    }
}
