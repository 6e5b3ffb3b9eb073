using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>read, vread, history, update, delete, create (FHIR R4 http.html).</summary>
public sealed class ResourceEndpointsTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Update_NewId_Returns201WithVersionHeaders()
    {
        var response = await _client.PutAsync("/Patient/upd-new", Json(Patient("upd-new")));

        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        Assert.Equal("W/\"1\"", response.Headers.ETag?.ToString());
        Assert.EndsWith("/Patient/upd-new/_history/1", response.Headers.Location?.ToString(), StringComparison.Ordinal);
        Assert.NotNull(response.Content.Headers.LastModified);
        var stored = await ReadAsync<Patient>(response);
        Assert.Equal("1", stored.Meta.VersionId);
        Assert.NotNull(stored.Meta.LastUpdated);
    }

    [Fact]
    public async System.Threading.Tasks.Task Read_Existing_ReturnsCurrentVersionAndETag()
    {
        await _client.PutAsync("/Patient/read-1", Json(Patient("read-1")));
        await _client.PutAsync("/Patient/read-1", Json(Patient("read-1", identifier: "MRN-1")));

        var response = await _client.GetAsync("/Patient/read-1");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("W/\"2\"", response.Headers.ETag?.ToString());
        var patient = await ReadAsync<Patient>(response);
        Assert.Equal("2", patient.Meta.VersionId);
        Assert.Equal("MRN-1", patient.Identifier.Single().Value);
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_StaleIfMatch_Returns412AndKeepsCurrent()
    {
        await _client.PutAsync("/Patient/lock-1", Json(Patient("lock-1")));
        await _client.PutAsync("/Patient/lock-1", Json(Patient("lock-1")));
        using var stale = new HttpRequestMessage(HttpMethod.Put, "/Patient/lock-1") { Content = Json(Patient("lock-1", identifier: "LOST")) };
        stale.Headers.TryAddWithoutValidation("If-Match", "W/\"1\"");

        var response = await _client.SendAsync(stale);

        Assert.Equal(HttpStatusCode.PreconditionFailed, response.StatusCode);
        Assert.Equal(["MEV-REQ-007"], Codes(await ReadAsync<OperationOutcome>(response)));
        var current = await ReadAsync<Patient>(await _client.GetAsync("/Patient/lock-1"));
        Assert.Equal("2", current.Meta.VersionId);
        Assert.Empty(current.Identifier);
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_CurrentIfMatch_Returns200NextVersion()
    {
        await _client.PutAsync("/Patient/lock-2", Json(Patient("lock-2")));
        using var request = new HttpRequestMessage(HttpMethod.Put, "/Patient/lock-2") { Content = Json(Patient("lock-2")) };
        request.Headers.TryAddWithoutValidation("If-Match", "W/\"1\"");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("W/\"2\"", response.Headers.ETag?.ToString());
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_MalformedIfMatch_Returns400()
    {
        using var request = new HttpRequestMessage(HttpMethod.Put, "/Patient/lock-3") { Content = Json(Patient("lock-3")) };
        request.Headers.TryAddWithoutValidation("If-Match", "\"latest\"");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["MEV-REQ-008"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task VersionRead_OlderVersion_ReturnsThatVersion()
    {
        await _client.PutAsync("/Patient/vread-1", Json(Patient("vread-1", identifier: "FIRST")));
        await _client.PutAsync("/Patient/vread-1", Json(Patient("vread-1", identifier: "SECOND")));

        var response = await _client.GetAsync("/Patient/vread-1/_history/1");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("W/\"1\"", response.Headers.ETag?.ToString());
        Assert.Equal("FIRST", (await ReadAsync<Patient>(response)).Identifier.Single().Value);
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/vread-1/_history/9")).StatusCode);
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/vread-1/_history/abc")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task History_UpdatedThenDeleted_NewestFirst()
    {
        await _client.PutAsync("/Patient/hist-1", Json(Patient("hist-1")));
        await _client.PutAsync("/Patient/hist-1", Json(Patient("hist-1")));
        await _client.DeleteAsync("/Patient/hist-1");

        var response = await _client.GetAsync("/Patient/hist-1/_history");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var bundle = await ReadAsync<Bundle>(response);
        Assert.Equal(Bundle.BundleType.History, bundle.Type);
        Assert.Equal(3, bundle.Total);
        Assert.Equal([Bundle.HTTPVerb.DELETE, Bundle.HTTPVerb.PUT, Bundle.HTTPVerb.POST], bundle.Entry.Select(e => e.Request.Method!.Value));
        Assert.Equal(["W/\"3\"", "W/\"2\"", "W/\"1\""], bundle.Entry.Select(e => e.Response.Etag));
        Assert.Null(bundle.Entry[0].Resource);
        Assert.Equal("2", bundle.Entry[1].Resource.Meta.VersionId);
    }

    [Fact]
    public async System.Threading.Tasks.Task History_Unknown_Returns404()
    {
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/never-stored/_history")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Read_Deleted_Returns410()
    {
        await _client.PutAsync("/Patient/gone-1", Json(Patient("gone-1")));
        var deleted = await _client.DeleteAsync("/Patient/gone-1");

        var response = await _client.GetAsync("/Patient/gone-1");

        Assert.Equal(HttpStatusCode.NoContent, deleted.StatusCode);
        Assert.Equal(HttpStatusCode.Gone, response.StatusCode);
        Assert.Equal(["MEV-REQ-006"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task Read_Unknown_Returns404()
    {
        var response = await _client.GetAsync("/Patient/never-stored");

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
        Assert.Equal(OperationOutcome.IssueType.NotFound, (await ReadAsync<OperationOutcome>(response)).Issue.Single().Code);
    }

    [Fact]
    public async System.Threading.Tasks.Task Delete_StaleIfMatch_Returns412()
    {
        await _client.PutAsync("/Patient/del-lock", Json(Patient("del-lock")));
        await _client.PutAsync("/Patient/del-lock", Json(Patient("del-lock")));
        using var request = new HttpRequestMessage(HttpMethod.Delete, "/Patient/del-lock");
        request.Headers.TryAddWithoutValidation("If-Match", "W/\"1\"");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.PreconditionFailed, response.StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await _client.GetAsync("/Patient/del-lock")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Create_ClientId_IgnoredServerIdAssigned()
    {
        var response = await _client.PostAsync("/Patient", Json(Patient("client-chosen")));

        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        var created = await ReadAsync<Patient>(response);
        Assert.NotEqual("client-chosen", created.Id);
        Assert.EndsWith($"/Patient/{created.Id}/_history/1", response.Headers.Location?.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public async System.Threading.Tasks.Task Create_IfNoneExistMatchesOne_Returns200WithoutDuplicate()
    {
        using var first = new HttpRequestMessage(HttpMethod.Post, "/Patient") { Content = Json(Patient(identifier: "COND-1")) };
        first.Headers.TryAddWithoutValidation("If-None-Exist", "identifier=http://riverbend.example.org/mrn|COND-1");
        using var second = new HttpRequestMessage(HttpMethod.Post, "/Patient") { Content = Json(Patient(identifier: "COND-1")) };
        second.Headers.TryAddWithoutValidation("If-None-Exist", "identifier=http://riverbend.example.org/mrn|COND-1");

        var created = await _client.SendAsync(first);
        var matched = await _client.SendAsync(second);

        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        Assert.Equal(HttpStatusCode.OK, matched.StatusCode);
        Assert.Equal((await ReadAsync<Patient>(created)).Id, (await ReadAsync<Patient>(matched)).Id);
        var found = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?identifier=http://riverbend.example.org/mrn|COND-1"));
        Assert.Equal(1, found.Total);
    }

    [Fact]
    public async System.Threading.Tasks.Task Create_IfNoneExistMatchesSeveral_Returns412()
    {
        await _client.PutAsync("/Patient/multi-1", Json(Patient("multi-1", identifier: "MULTI")));
        await _client.PutAsync("/Patient/multi-2", Json(Patient("multi-2", identifier: "MULTI")));
        using var request = new HttpRequestMessage(HttpMethod.Post, "/Patient") { Content = Json(Patient(identifier: "MULTI")) };
        request.Headers.TryAddWithoutValidation("If-None-Exist", "identifier=MULTI");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.PreconditionFailed, response.StatusCode);
        Assert.Equal(["MEV-REQ-009"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task Create_PreferMinimal_NoBody()
    {
        using var request = new HttpRequestMessage(HttpMethod.Post, "/Patient") { Content = Json(Patient()) };
        request.Headers.TryAddWithoutValidation("Prefer", "return=minimal");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        Assert.Empty(await response.Content.ReadAsStringAsync());
        Assert.NotNull(response.Headers.Location);
    }
}
