using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>Type-level search (FHIR R4 search.html): parameters, paging links, unknown-parameter handling.</summary>
public sealed class SearchEndpointsTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Search_CountThree_PagesThroughAllWithLinks()
    {
        for (var i = 0; i < 7; i++)
        {
            await _client.PutAsync($"/Observation/page-{i}", Json(Weight($"page-{i}", "page-patient")));
        }

        var seen = new List<string>();
        var url = "/Observation?patient=Patient/page-patient&_count=3";
        var pages = 0;
        Bundle page;
        do
        {
            page = await ReadAsync<Bundle>(await _client.GetAsync(url));
            pages++;
            Assert.Equal(7, page.Total);
            seen.AddRange(page.Entry.Select(e => e.Resource.Id));
            url = page.NextLink?.PathAndQuery!;
        }
        while (page.NextLink is not null && pages < 10);

        Assert.Equal(3, pages);
        Assert.Equal(Enumerable.Range(0, 7).Select(i => $"page-{i}").Order(StringComparer.Ordinal), seen);
        Assert.NotNull(page.PreviousLink);
        Assert.Contains("_offset=3", page.PreviousLink!.ToString(), StringComparison.Ordinal);
        Assert.Contains("_offset=0", page.FirstLink!.ToString(), StringComparison.Ordinal);
        Assert.Contains("patient=Patient%2Fpage-patient", page.SelfLink!.ToString(), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("patient=Patient/subj-a")]
    [InlineData("subject=Patient/subj-a")]
    [InlineData("patient=subj-a")]
    public async System.Threading.Tasks.Task Search_PatientOrSubject_OnlyThatPatientsResources(string criterion)
    {
        await _client.PutAsync("/Observation/subj-a-1", Json(Weight("subj-a-1", "subj-a")));
        await _client.PutAsync("/Observation/subj-b-1", Json(Weight("subj-b-1", "subj-b")));

        var bundle = await ReadAsync<Bundle>(await _client.GetAsync($"/Observation?{criterion}"));

        Assert.Equal(["subj-a-1"], bundle.Entry.Select(e => e.Resource.Id));
    }

    [Fact]
    public async System.Threading.Tasks.Task Search_Beneficiary_FindsCoverage()
    {
        var coverage = new Coverage
        {
            Id = "cov-1",
            Status = FinancialResourceStatusCodes.Active,
            Beneficiary = new ResourceReference("Patient/cov-patient"),
            Payor = [new ResourceReference("Organization/cedar-valley")],
        };
        await _client.PutAsync("/Coverage/cov-1", Json(coverage));

        var bundle = await ReadAsync<Bundle>(await _client.GetAsync("/Coverage?beneficiary=Patient/cov-patient"));

        Assert.Equal(["cov-1"], bundle.Entry.Select(e => e.Resource.Id));
    }

    [Fact]
    public async System.Threading.Tasks.Task Search_IdentifierSystemAndValue_MatchesOnlyThatSystem()
    {
        await _client.PutAsync("/Patient/ident-1", Json(Patient("ident-1", identifier: "MRN-77")));
        var other = Patient("ident-2");
        other.Identifier.Add(new Identifier("http://cedarvalley.example.org/member", "MRN-77"));
        await _client.PutAsync("/Patient/ident-2", Json(other));

        var bySystem = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?identifier=http://riverbend.example.org/mrn|MRN-77"));
        var anySystem = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?identifier=MRN-77"));

        Assert.Equal(["ident-1"], bySystem.Entry.Select(e => e.Resource.Id));
        Assert.Equal(["ident-1", "ident-2"], anySystem.Entry.Select(e => e.Resource.Id));
    }

    [Fact]
    public async System.Threading.Tasks.Task Search_LastUpdatedPrefixes_SelectByTime()
    {
        await _client.PutAsync("/Procedure/lu-1", Json(new Procedure { Id = "lu-1", Status = EventStatus.Completed, Subject = new ResourceReference("Patient/lu-patient") }));
        var stored = await ReadAsync<Procedure>(await _client.GetAsync("/Procedure/lu-1"));
        var day = stored.Meta.LastUpdated!.Value.UtcDateTime.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture);

        async Task<int?> Total(string value) => (await ReadAsync<Bundle>(await _client.GetAsync($"/Procedure?_id=lu-1&_lastUpdated={Uri.EscapeDataString(value)}"))).Total;

        Assert.Equal(1, await Total(day));
        Assert.Equal(1, await Total("eq" + day));
        Assert.Equal(0, await Total("ne" + day));
        Assert.Equal(0, await Total("gt" + day));
        Assert.Equal(1, await Total("ge" + day));
        Assert.Equal(1, await Total("le" + day));
        Assert.Equal(0, await Total("lt" + day));
        Assert.Equal(1, await Total("sa2000"));
        Assert.Equal(0, await Total("eb2000-06"));
    }

    [Fact]
    public async System.Threading.Tasks.Task Search_UnknownParameter_IgnoredWithWarningOutcomeEntry()
    {
        var bundle = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?_id=none-such&favourite-colour=teal"));

        var outcomeEntry = Assert.Single(bundle.Entry);
        Assert.Equal(Bundle.SearchEntryMode.Outcome, outcomeEntry.Search.Mode);
        var outcome = Assert.IsType<OperationOutcome>(outcomeEntry.Resource);
        Assert.Equal(OperationOutcome.IssueSeverity.Warning, outcome.Issue.Single().Severity);
        Assert.Equal(["MEV-SEARCH-001"], Codes(outcome));
        Assert.DoesNotContain("favourite-colour", bundle.SelfLink!.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public async System.Threading.Tasks.Task Search_UnknownParameterStrict_Returns400()
    {
        using var request = new HttpRequestMessage(HttpMethod.Get, "/Patient?favourite-colour=teal");
        request.Headers.TryAddWithoutValidation("Prefer", "handling=strict");

        var response = await _client.SendAsync(request);

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(OperationOutcome.IssueSeverity.Error, outcome.Issue.Single().Severity);
    }

    [Theory]
    [InlineData("_lastUpdated=yesterday", "MEV-SEARCH-002")]
    [InlineData("_lastUpdated=ap2024-01-01", "MEV-SEARCH-003")]
    [InlineData("_count=-1", "MEV-SEARCH-002")]
    [InlineData("_id:missing=true", "MEV-SEARCH-003")]
    public async System.Threading.Tasks.Task Search_InvalidValue_Returns400(string query, string code)
    {
        var response = await _client.GetAsync($"/Patient?{query}");

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal([code], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task SearchPost_FormBody_SameAsGet()
    {
        await _client.PutAsync("/Patient/post-1", Json(Patient("post-1")));
        using var form = new FormUrlEncodedContent([new("_id", "post-1")]);

        var response = await _client.PostAsync("/Patient/_search", form);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(["post-1"], (await ReadAsync<Bundle>(response)).Entry.Select(e => e.Resource.Id));
    }

    [Fact]
    public async System.Threading.Tasks.Task Search_CountZero_TotalOnly()
    {
        await _client.PutAsync("/Patient/count-0", Json(Patient("count-0")));

        var bundle = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?_id=count-0&_count=0"));

        Assert.Equal(1, bundle.Total);
        Assert.Empty(bundle.Entry);
    }

    private static Observation Weight(string id, string patientId) => new()
    {
        Id = id,
        Status = ObservationStatus.Final,
        Code = new CodeableConcept("http://loinc.org", "29463-7", "Body weight"),
        Subject = new ResourceReference($"Patient/{patientId}"),
        Value = new Quantity(72.5m, "kg"),
    };
}
