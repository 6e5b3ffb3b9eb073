using System.Globalization;
using System.Net;
using System.Text.Json;
using CsvHelper;
using CsvHelper.Configuration;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests.CareGaps;

/// <summary>Fixture: one store with the invented Riverbend panel of Inputs/CareGaps/riverbend-gaps.json, loaded once.</summary>
public sealed class CareGapsFactory : ApiFactory
{
    private readonly SemaphoreSlim _gate = new(1, 1);
    private bool _loaded;

    public async Task<HttpClient> ClientAsync()
    {
        var client = CreateClient();
        await _gate.WaitAsync();
        try
        {
            if (!_loaded)
            {
                var loaded = await client.PostAsync("/", Json(Input("CareGaps/riverbend-gaps.json")));
                Assert.Equal(HttpStatusCode.OK, loaded.StatusCode);
                var group = await client.PutAsync("/Group/cedar-valley-attributed", Json(Input("CareGaps/group-cedar-valley.json")));
                Assert.Equal(HttpStatusCode.Created, group.StatusCode);
                _loaded = true;
            }
        }
        finally
        {
            _gate.Release();
        }

        return client;
    }
}

/// <summary>
/// $care-gaps and its export over four patients, MP 2026, colorectal cancer screening (USPSTF 2021 windows as in
/// measure-specs.md): p-ana no screening (open), p-ben colonoscopy 2019-05-02 (closed through 2028), p-cara FIT
/// 2026-02-11 (prospective: a FIT counts in its own period only), p-dev no screening, no panel, coverage cancelled (open).
/// </summary>
public sealed class CareGapEndpointsTests(CareGapsFactory factory) : IClassFixture<CareGapsFactory>
{
    private const string Colorectal = "periodStart=2026-01-01&periodEnd=2026-12-31&measureId=colorectal-cancer-screening";
    private const string AllStatuses = "&status=open-gap&status=closed-gap&status=prospective-gap&status=not-applicable";

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_EveryResourceValidatesAgainstBaseR4()
    {
        var client = await factory.ClientAsync();

        var response = await client.GetAsync($"/Measure/$care-gaps?{Colorectal}{AllStatuses}");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var parameters = await ReadAsync<Parameters>(response);
        Assert.Empty(BaseR4Validator.Shared.Errors(parameters));
        var bundles = parameters.Parameter.Select(p => Assert.IsType<Bundle>(p.Resource)).ToList();
        Assert.Equal(4, bundles.Count);
        Assert.All(parameters.Parameter, p => Assert.Equal("return", p.Name));
        foreach (var resource in bundles.SelectMany(b => b.Entry.Select(e => e.Resource)).Prepend<Resource>(bundles[0]))
        {
            Assert.Empty(BaseR4Validator.Shared.Errors(resource));
        }
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_StatusPerPatient()
    {
        var client = await factory.ClientAsync();

        var statuses = await StatusesAsync(client, $"/Measure/$care-gaps?{Colorectal}{AllStatuses}");

        Assert.Equal("open-gap", statuses["p-ana"]);
        Assert.Equal("closed-gap", statuses["p-ben"]);
        Assert.Equal("prospective-gap", statuses["p-cara"]);
        Assert.Equal("open-gap", statuses["p-dev"]);
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_DetectedIssueReferencesReportAndEvidence()
    {
        var client = await factory.ClientAsync();

        var parameters = await ReadAsync<Parameters>(await client.GetAsync($"/Measure/$care-gaps?{Colorectal}&subject=Patient/p-ben&status=closed-gap"));

        var bundle = Assert.IsType<Bundle>(Assert.Single(parameters.Parameter).Resource);
        var report = Assert.Single(bundle.Entry, e => e.Resource is MeasureReport);
        var issue = (DetectedIssue)Assert.Single(bundle.Entry, e => e.Resource is DetectedIssue).Resource;
        Assert.Equal([report.FullUrl, "Procedure/p-ben-colo"], issue.Evidence.Single().Detail.Select(d => d.Reference));
        // Colonoscopy during MP or the 9 years before: 2019-05-02 counts through MP 2028 (USPSTF 2021 interval).
        Assert.Equal("2028-12-31", ((Date)issue.GetExtension("https://measureeval.example.org/fhir/StructureDefinition/gap-counts-through").Value).Value);
        Assert.Equal("2029-01-01", ((Date)issue.GetExtension("https://measureeval.example.org/fhir/StructureDefinition/gap-due-again-from").Value).Value);
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_PractitionerNarrowsToThePanel()
    {
        var client = await factory.ClientAsync();

        var statuses = await StatusesAsync(client, $"/Measure/$care-gaps?{Colorectal}&practitioner=Practitioner/dr-okafor&status=open-gap");

        Assert.Equal(["p-ana"], statuses.Keys);
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_OrganizationNarrowsToActiveCoverage()
    {
        var client = await factory.ClientAsync();

        var statuses = await StatusesAsync(client, $"/Measure/$care-gaps?{Colorectal}&organization=Organization/cedar-valley{AllStatuses}");

        // p-dev's Cedar Valley coverage is cancelled: not a member.
        Assert.Equal(["p-ana", "p-ben"], statuses.Keys.Order(StringComparer.Ordinal));
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_GroupSubjectTakesActiveMembersOnly()
    {
        var client = await factory.ClientAsync();

        var statuses = await StatusesAsync(client, $"/Measure/$care-gaps?{Colorectal}&subject=Group/cedar-valley-attributed{AllStatuses}");

        // p-ben is inactive; p-dev was attributed in 2024-2025 only.
        Assert.Equal(["p-ana", "p-cara"], statuses.Keys.Order(StringComparer.Ordinal));
    }

    [Fact]
    public async System.Threading.Tasks.Task PostCareGaps_ParametersBody()
    {
        var client = await factory.ClientAsync();
        var body = new Parameters();
        body.Add("periodStart", new Date("2026-01-01"));
        body.Add("periodEnd", new Date("2026-12-31"));
        body.Add("subject", new FhirString("Patient/p-cara"));
        body.Add("measureId", new FhirString("colorectal-cancer-screening"));
        body.Add("status", new Code("prospective-gap"));
        body.Add("horizon", new Date("2026-12-31"));

        var response = await client.PostAsync("/Measure/$care-gaps", Json(body));

        // With the horizon at periodEnd the FIT of 2026-02-11 keeps the gap closed: nothing prospective to report.
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Empty((await ReadAsync<Parameters>(response)).Parameter);
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_BadParametersAllReported()
    {
        var client = await factory.ClientAsync();

        var response = await client.GetAsync("/Measure/$care-gaps?periodStart=2026-13-01&status=open&subject=Practitioner/x&program=x");

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(4, outcome.Issue.Count);
        Assert.All(Codes(outcome), c => Assert.Equal("MEV-GAPS-001", c));
        Assert.Equal(["program", "periodStart", "subject", "status"], outcome.Issue.Select(i => i.Expression.Single()));
    }

    [Fact]
    public async System.Threading.Tasks.Task GetCareGaps_UnknownMeasureAndGroup()
    {
        var client = await factory.ClientAsync();

        var response = await client.GetAsync("/Measure/$care-gaps?measureId=no-such-measure&subject=Group/nobody");

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
        Assert.Equal(["MEV-GAPS-002", "MEV-GAPS-003"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    [Fact]
    public async System.Threading.Tasks.Task Export_CsvReadsBackWithQuotingAndFilter()
    {
        var client = await factory.ClientAsync();

        var response = await client.GetAsync($"/Measure/$care-gaps-export?{Colorectal}&status=open-gap&_format=csv");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("text/csv", response.Content.Headers.ContentType?.MediaType);
        var text = await response.Content.ReadAsStringAsync();
        using var csv = new CsvReader(new StringReader(text), new CsvConfiguration(CultureInfo.InvariantCulture));
        var rows = csv.GetRecords<dynamic>().Cast<IDictionary<string, object>>().ToList();
        Assert.Equal(["p-ana", "p-dev"], rows.Select(r => (string)r["patient_id"]));
        Assert.All(rows, r => Assert.Equal("open-gap", r["status"]));
        var ana = rows[0];
        Assert.Equal("Practitioner/dr-okafor", ana["panel"]);
        Assert.Equal("Organization/cedar-valley", ana["payer"]);
        Assert.Equal("2026-12-31", ana["due_by"]);
        // The five alternatives are joined with ", or ": the field is quoted and comes back whole.
        Assert.Equal(5, ((string)ana["what_closes_it"]).Split(", or ").Length);
        Assert.Contains("\"colonoscopy in the period or the 9 years before by 2026-12-31, or ", text, StringComparison.Ordinal);
        Assert.Equal("unattributed", rows[1]["panel"]);
        Assert.Equal("none", rows[1]["payer"]);
    }

    [Fact]
    public async System.Threading.Tasks.Task Export_NdjsonOneObjectPerRow()
    {
        var client = await factory.ClientAsync();

        var response = await client.GetAsync($"/Measure/$care-gaps-export?{Colorectal}{AllStatuses}&_format=ndjson");

        var lines = (await response.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(4, lines.Length);
        var ben = lines.Select(l => JsonDocument.Parse(l).RootElement).Single(e => e.GetProperty("patient_id").GetString() == "p-ben");
        Assert.Equal("closed-gap", ben.GetProperty("status").GetString());
        Assert.Equal("2029-01-01", ben.GetProperty("due_again_from").GetString());
        Assert.Equal("Procedure/p-ben-colo", ben.GetProperty("evidence")[0].GetProperty("references")[0].GetString());
    }

    [Fact]
    public async System.Threading.Tasks.Task Export_BadFormatIsAnOperationOutcome()
    {
        var client = await factory.ClientAsync();

        var response = await client.GetAsync($"/Measure/$care-gaps-export?{Colorectal}&_format=xlsx");

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["MEV-GAPS-001"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    private static async Task<Dictionary<string, string>> StatusesAsync(HttpClient client, string url)
    {
        var response = await client.GetAsync(url);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var parameters = await ReadAsync<Parameters>(response);
        return parameters.Parameter
            .SelectMany(p => ((Bundle)p.Resource).Entry.Select(e => e.Resource).OfType<DetectedIssue>())
            .ToDictionary(
                i => i.Patient.Reference["Patient/".Length..],
                i => ((CodeableConcept)i.GetExtension("https://measureeval.example.org/fhir/StructureDefinition/gap-status").Value).Coding[0].Code);
    }
}
