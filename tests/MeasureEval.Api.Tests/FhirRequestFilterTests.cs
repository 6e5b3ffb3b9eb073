using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>Format negotiation (FHIR R4 http.html "Content Types and encodings", "FHIR Version parameter") and the URL's resource type.</summary>
public sealed class FhirRequestFilterTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Theory]
    [InlineData("json", "application/fhir+json")]
    [InlineData("application/fhir+json", "application/fhir+json")]
    [InlineData("application/json", "application/json")]
    public async System.Threading.Tasks.Task Format_JsonForms_AnswerInThatMediaType(string format, string expected)
    {
        var response = await _client.GetAsync($"/metadata?_format={Uri.EscapeDataString(format)}");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(expected, response.Content.Headers.ContentType?.MediaType);
    }

    [Fact]
    public async System.Threading.Tasks.Task Format_Xml_Returns406()
    {
        var response = await _client.GetAsync("/metadata?_format=xml");

        Assert.Equal(HttpStatusCode.NotAcceptable, response.StatusCode);
        Assert.Equal(["MEV-FMT-002"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task Accept_OtherFhirVersion_Returns406()
    {
        using var request = new HttpRequestMessage(HttpMethod.Get, "/metadata");
        request.Headers.TryAddWithoutValidation("Accept", "application/fhir+json; fhirVersion=3.0");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.NotAcceptable, response.StatusCode);
        Assert.Equal(["MEV-FMT-003"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task Accept_Json_AnswersApplicationJson()
    {
        using var request = new HttpRequestMessage(HttpMethod.Get, "/metadata");
        request.Headers.TryAddWithoutValidation("Accept", "application/json");

        var response = await _client.SendAsync(request);

        Assert.Equal("application/json", response.Content.Headers.ContentType?.MediaType);
    }

    [Fact]
    public async System.Threading.Tasks.Task ContentType_OtherFhirVersion_Returns415()
    {
        var response = await _client.PutAsync("/Patient/v-1", Json("""{"resourceType":"Patient","id":"v-1"}""", "application/fhir+json; fhirVersion=5.0"));

        Assert.Equal(HttpStatusCode.UnsupportedMediaType, response.StatusCode);
        Assert.Equal(["MEV-FMT-004"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task ContentType_Xml_Returns415()
    {
        var response = await _client.PutAsync("/Patient/x-1", Json("<Patient xmlns=\"http://hl7.org/fhir\"/>", "application/fhir+xml"));

        Assert.Equal(HttpStatusCode.UnsupportedMediaType, response.StatusCode);
        Assert.Equal(["MEV-FMT-001"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task ContentType_ApplicationJson_Accepted()
    {
        var response = await _client.PutAsync("/Patient/json-1", Json("""{"resourceType":"Patient","id":"json-1"}""", "application/json"));

        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Type_UnknownResourceType_Returns404NotSupported()
    {
        var response = await _client.GetAsync("/Patiant/1");

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(OperationOutcome.IssueType.NotSupported, Assert.Single(outcome.Issue).Code);
        Assert.Equal(["MEV-REQ-004"], Codes(outcome));
    }

    [Fact]
    public async System.Threading.Tasks.Task Pretty_True_IndentsBody()
    {
        var compact = await (await _client.GetAsync("/metadata")).Content.ReadAsStringAsync();
        var pretty = await (await _client.GetAsync("/metadata?_pretty=true")).Content.ReadAsStringAsync();

        Assert.DoesNotContain('\n', compact);
        Assert.Contains("\n  \"resourceType\"", pretty, StringComparison.Ordinal);
    }
}
