using System.Net;
using System.Text;
using Hl7.Fhir.Model;
using Microsoft.AspNetCore.Hosting;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>The configurable limits (section Ingest), with small values set by the factory.</summary>
public sealed class IngestOptionsTests(SmallLimitsApiFactory factory) : IClassFixture<SmallLimitsApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task MaxBundleEntries_MoreEntries_Returns413AtBundleEntry()
    {
        var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
        for (var i = 0; i < 4; i++)
        {
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                Resource = Patient($"entries-{i}"),
                Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.PUT, Url = $"Patient/entries-{i}" },
            });
        }

        var tooMany = await _client.PostAsync("/", Json(bundle));
        var afterRefusal = await _client.GetAsync("/Patient/entries-0");
        bundle.Entry.RemoveAt(3);
        var atLimit = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, tooMany.StatusCode);
        var issue = Issue(await ReadAsync<OperationOutcome>(tooMany), "MEV-LIMIT-001");
        Assert.Equal(["Bundle.entry"], issue.Expression);
        Assert.Equal(HttpStatusCode.NotFound, afterRefusal.StatusCode);
        Assert.Equal(HttpStatusCode.OK, atLimit.StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task MaxBodyBytes_LargerBody_Returns413()
    {
        var response = await _client.PutAsync("/Patient/too-large-1", Json(Input("BadInput/too-large.json")));

        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(OperationOutcome.IssueType.TooLong, Issue(outcome, "MEV-PARSE-006").Code);
    }

    [Fact]
    public async System.Threading.Tasks.Task MaxBodyBytes_ChunkedBodyWithoutLength_Returns413()
    {
        var bytes = Encoding.UTF8.GetBytes(Input("BadInput/too-large.json"));
        using var content = new StreamContent(new MemoryStream(bytes));
        content.Headers.ContentType = new("application/fhir+json");

        var response = await _client.PutAsync("/Patient/too-large-1", content);

        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, response.StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task MaxJsonDepth_DeeperBody_Returns400()
    {
        var response = await _client.PutAsync("/Patient/too-deep-1", Json(Input("BadInput/too-deep.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(OperationOutcome.IssueType.TooCostly, Issue(outcome, "MEV-PARSE-005").Code);
    }

    [Fact]
    public async System.Threading.Tasks.Task MaxJsonDepth_DeeperNdjsonLine_RefusesThatLineOnly()
    {
        var deep = Input("BadInput/too-deep.json").ReplaceLineEndings("");
        var body = $"{{\"resourceType\":\"Patient\",\"id\":\"depth-ok\"}}\n{deep}\n";

        var response = await _client.PostAsync("/$ingest", Json(body, "application/fhir+ndjson"));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Parameters>(response);
        Assert.Equal(1, ((Integer)Param(result, "stored").Value).Value);
        var outcome = (OperationOutcome)Param(result, "outcome").Resource;
        Assert.Equal(2, Line(Issue(outcome, "MEV-PARSE-005")));
    }

    [Fact]
    public async System.Threading.Tasks.Task BulkBatchSize_FiveResources_AllStoredAcrossBatches()
    {
        var body = string.Join('\n', Enumerable.Range(1, 5).Select(i => $"{{\"resourceType\":\"Patient\",\"id\":\"batch-{i}\"}}"));

        var response = await _client.PostAsync("/$ingest", Json(body, "application/x-ndjson"));

        var result = await ReadAsync<Parameters>(response);
        Assert.Equal(5, ((Integer)Param(result, "stored").Value).Value);
        var found = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?_id=batch-1,batch-2,batch-3,batch-4,batch-5&_count=0"));
        Assert.Equal(5, found.Total);
    }

    [Fact]
    public void Validation_DepthBelowMinimum_HostDoesNotStart()
    {
        using var invalid = new ApiFactory().WithWebHostBuilder(builder => builder.UseSetting("Ingest:MaxJsonDepth", "2"));

        var error = Assert.Throws<Microsoft.Extensions.Options.OptionsValidationException>(() => invalid.CreateClient());

        Assert.Contains("MaxJsonDepth", error.Message, StringComparison.Ordinal);
    }
}
