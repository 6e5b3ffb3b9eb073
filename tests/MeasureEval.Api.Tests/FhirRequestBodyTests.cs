using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>Bodies the strict parser refuses: status, stable code, FHIRPath expression, and nothing stored.</summary>
public sealed class FhirRequestBodyTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Update_MalformedJson_Returns400WithLine()
    {
        var response = await _client.PutAsync("/Patient/malformed-1", Json(Input("BadInput/malformed.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        var issue = Assert.Single(outcome.Issue);
        Assert.Equal("MEV-PARSE-001", Codes(outcome)[0]);
        Assert.Equal(OperationOutcome.IssueType.Structure, issue.Code);
        // The missing comma is before "gender" on line 5 of the file.
        Assert.Equal(5, Line(issue));
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/malformed-1")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_UnknownResourceTypeInEntry_Returns400AtEntry()
    {
        var response = await _client.PostAsync("/", Json(Input("BadInput/unknown-resource-type-entry.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        var issue = Issue(outcome, "MEV-PARSE-004");
        Assert.Equal(["Bundle.entry[1].resource"], issue.Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_WrongResourceType_Returns400()
    {
        var response = await _client.PutAsync("/Patient/wrong-type-1", Json(Input("BadInput/wrong-resource-type.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(OperationOutcome.IssueType.Invalid, Issue(outcome, "MEV-REQ-001").Code);
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_UnknownElements_ReportsEachWithPath()
    {
        var response = await _client.PutAsync("/Patient/unknown-elements-1", Json(Input("BadInput/unknown-elements.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(["MEV-PARSE-002", "MEV-PARSE-002"], Codes(outcome));
        Assert.Equal(["Patient.favouriteColour", "Patient.name[0].nickname"], outcome.Issue.Select(i => i.Expression.Single()));
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_InvalidPrimitives_CollectsAllAndStoresNothing()
    {
        var before = await CountAsync("Patient");

        var response = await _client.PostAsync("/", Json(Input("BadInput/invalid-primitives.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        // Feb 30 is no date; "woman" is not in AdministrativeGender (R4 valueset administrative-gender); a decimal is a JSON number, not a string.
        Assert.Equal(
            ["Bundle.entry[0].resource.birthDate", "Bundle.entry[0].resource.gender", "Bundle.entry[1].resource.value.value"],
            outcome.Issue.Select(i => i.Expression.Single()).Order(StringComparer.Ordinal));
        Assert.All(Codes(outcome), code => Assert.Equal("MEV-PARSE-003", code));
        Assert.Equal(before, await CountAsync("Patient"));
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_FullUrlNotAUuid_Returns400AtFullUrl()
    {
        var response = await _client.PostAsync("/", Json(Input("BadInput/bad-urn-uuid.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(["Bundle.entry[0].fullUrl"], Issue(outcome, "MEV-PARSE-003").Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_BodyIdDiffersFromUrl_Returns400AtId()
    {
        var response = await _client.PutAsync("/Patient/expected-id", Json(Input("BadInput/id-mismatch.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(["Patient.id"], Issue(outcome, "MEV-REQ-002").Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_EmptyBody_Returns400()
    {
        var response = await _client.PutAsync("/Patient/empty-1", Json(" "));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["MEV-PARSE-008"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task Update_UnpairedSurrogateEscape_Returns400NotServerError()
    {
        // RFC 8259 section 8.2: a lone surrogate escape ("\ud800") is syntactically allowed but is no Unicode text;
        // FHIR strings are Unicode (R4 datatypes.html#string), so the body is refused as malformed, never a 500.
        var response = await _client.PutAsync("/Patient/surrogate-1", Json(Input("BadInput/unpaired-surrogate.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["MEV-PARSE-001"], Codes(await ReadAsync<OperationOutcome>(response)));
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/surrogate-1")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_UnpairedSurrogateEscape_Returns400AndStoresNothing()
    {
        var before = await CountAsync("Patient");

        var response = await _client.PostAsync("/", Json(Input("BadInput/unpaired-surrogate-transaction.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["MEV-PARSE-001"], Codes(await ReadAsync<OperationOutcome>(response)));
        Assert.Equal(before, await CountAsync("Patient"));
    }

    private async Task<int> CountAsync(string type)
    {
        var bundle = await ReadAsync<Bundle>(await _client.GetAsync($"/{type}?_count=0"));
        return bundle.Total ?? -1;
    }
}
