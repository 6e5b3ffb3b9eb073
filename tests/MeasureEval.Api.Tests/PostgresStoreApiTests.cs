using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>The same interactions with <c>Storage:Provider=Postgres</c> on a throwaway PostgreSQL 15 (skipped where it is not installed).</summary>
public sealed class PostgresStoreApiTests(PostgresServer server) : IClassFixture<PostgresServer>
{
    [SkippableFact]
    public async System.Threading.Tasks.Task Postgres_TransactionIngestSearchAndIfMatch_Work()
    {
        Skip.IfNot(server.IsAvailable, server.UnavailableReason);
        var connectionString = await server.CreateSchemaAsync();
        using var factory = new WebApplicationFactory<Program>().WithWebHostBuilder(builder =>
        {
            builder.UseSetting("Storage:Provider", "Postgres");
            builder.UseSetting("Storage:ConnectionString", connectionString);
            foreach (var (key, value) in TestTokens.Settings)
            {
                builder.UseSetting(key, value);
            }
        });
        var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");

        var transaction = await client.PostAsync("/", Json(Input("Bundles/linked-transaction.json")));
        var ingest = await client.PostAsync("/$ingest", Json(Input("Ingest/mixed.ndjson"), "application/fhir+ndjson"));
        var refused = await client.PostAsync("/", Json(Input("BadInput/unresolved-reference.json")));
        await client.PutAsync("/Patient/pg-lock", Json(Patient("pg-lock")));
        await client.PutAsync("/Patient/pg-lock", Json(Patient("pg-lock")));
        using var stale = new HttpRequestMessage(HttpMethod.Put, "/Patient/pg-lock") { Content = Json(Patient("pg-lock")) };
        stale.Headers.TryAddWithoutValidation("If-Match", "W/\"1\"");
        var conflict = await client.SendAsync(stale);
        var page = await ReadAsync<Bundle>(await client.GetAsync("/Observation?patient=Patient/nd-1&_count=1"));

        Assert.Equal(HttpStatusCode.OK, transaction.StatusCode);
        Assert.Equal(3, ((Integer)Param(await ReadAsync<Parameters>(ingest), "stored").Value).Value);
        Assert.Equal(HttpStatusCode.UnprocessableEntity, refused.StatusCode);
        Assert.Equal(HttpStatusCode.PreconditionFailed, conflict.StatusCode);
        Assert.Equal(1, page.Total);
        Assert.Equal("nd-obs-1", page.Entry.Single().Resource.Id);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/ready")).StatusCode);
    }
}
