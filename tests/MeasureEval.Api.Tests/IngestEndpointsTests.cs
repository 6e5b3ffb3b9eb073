using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>POST /$ingest: bulk upsert of NDJSON and collection Bundles, good units kept, bad ones located.</summary>
public sealed class IngestEndpointsTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Theory]
    [InlineData("application/fhir+ndjson")]
    [InlineData("application/x-ndjson")]
    public async System.Threading.Tasks.Task Ingest_Ndjson_KeepsGoodLinesAndReportsBadWithLineNumbers(string mediaType)
    {
        var response = await _client.PostAsync("/$ingest", Json(Input("Ingest/mixed.ndjson"), mediaType));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Parameters>(response);
        Assert.Equal(3, ((Integer)Param(result, "stored").Value).Value);
        Assert.Equal(3, ((Integer)Param(result, "refused").Value).Value);
        var perType = result.Parameter.Where(p => p.Name == "type")
            .ToDictionary(p => ((Code)p.Part.Single(x => x.Name == "resourceType").Value).Value, p => ((Integer)p.Part.Single(x => x.Name == "stored").Value).Value);
        Assert.Equal(new Dictionary<string, int?> { ["Immunization"] = 1, ["Observation"] = 1, ["Patient"] = 1 }, perType);
        var outcome = (OperationOutcome)Param(result, "outcome").Resource;
        // Lines of Inputs/Ingest/mixed.ndjson: 2 has no id, 3 is blank (skipped), 4 has Feb 30, 5 is cut off.
        Assert.Equal(["MEV-INGEST-001", "MEV-PARSE-003", "MEV-PARSE-001"], Codes(outcome));
        Assert.Equal([2, 4, 5], outcome.Issue.Select(Line));
        Assert.Equal(["Patient.id"], outcome.Issue[0].Expression);
        Assert.Equal(["Patient.birthDate"], outcome.Issue[1].Expression);
        Assert.Equal(HttpStatusCode.OK, (await _client.GetAsync("/Immunization/nd-imm-1")).StatusCode);
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/nd-3")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Ingest_CollectionBundle_ReportsEntryExpressions()
    {
        var response = await _client.PostAsync("/$ingest", Json(Input("Ingest/collection-mixed.json")));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Parameters>(response);
        Assert.Equal(2, ((Integer)Param(result, "stored").Value).Value);
        Assert.Equal(3, ((Integer)Param(result, "refused").Value).Value);
        var outcome = (OperationOutcome)Param(result, "outcome").Resource;
        Assert.Equal(["MEV-PARSE-003", "MEV-INGEST-001", "MEV-BUNDLE-007"], Codes(outcome));
        Assert.Equal(
            ["Bundle.entry[1].resource.gender", "Bundle.entry[2].resource.id", "Bundle.entry[4]"],
            outcome.Issue.Select(i => i.Expression.Single()));
        Assert.Equal(HttpStatusCode.OK, (await _client.GetAsync("/Condition/col-cond-1")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Ingest_AuditEventLine_RefusedOthersStored()
    {
        var response = await _client.PostAsync("/$ingest", Json(Input("Ingest/audit-event.ndjson"), "application/fhir+ndjson"));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Parameters>(response);
        Assert.Equal(1, ((Integer)Param(result, "stored").Value).Value);
        Assert.Equal(1, ((Integer)Param(result, "refused").Value).Value);
        Assert.Equal(["MEV-AUDIT-002"], Codes((OperationOutcome)Param(result, "outcome").Resource).Where(c => c != "MEV-INGEST-002"));
        Assert.Equal(HttpStatusCode.OK, (await _client.GetAsync("/Patient/aud-ing-1")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Ingest_SameIdTwice_NewVersion()
    {
        var line = """{"resourceType":"Patient","id":"upsert-1","gender":"female"}""";

        await _client.PostAsync("/$ingest", Json(line, "application/fhir+ndjson"));
        await _client.PostAsync("/$ingest", Json(line, "application/fhir+ndjson"));

        Assert.Equal("2", (await ReadAsync<Patient>(await _client.GetAsync("/Patient/upsert-1"))).Meta.VersionId);
    }

    [Fact]
    public async System.Threading.Tasks.Task Ingest_BundleBrokenMidway_KeepsEarlierEntriesAndReturns400()
    {
        var response = await _client.PostAsync("/$ingest", Json(Input("Ingest/broken-collection.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(["MEV-PARSE-001", "MEV-INGEST-003"], Codes(outcome));
        // The missing "}" of entry 1 makes entry 1 unreadable; the reader stops at line 6 of the file.
        Assert.Equal(["Bundle.entry[1]"], outcome.Issue[0].Expression);
        Assert.Equal(7, Line(outcome.Issue[0]));
        Assert.Equal(HttpStatusCode.OK, (await _client.GetAsync("/Patient/brk-1")).StatusCode);
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/brk-3")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Ingest_TransactionBundle_Refused()
    {
        var response = await _client.PostAsync("/$ingest", Json(Input("Bundles/conditional-transaction.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["Bundle.type"], Issue(await ReadAsync<OperationOutcome>(response), "MEV-BUNDLE-001").Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task Ingest_NotABundle_Refused()
    {
        var response = await _client.PostAsync("/$ingest", Json("""{"resourceType":"Patient","id":"single"}"""));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["MEV-PARSE-004"], Codes(await ReadAsync<OperationOutcome>(response)).Take(1));
    }
}
