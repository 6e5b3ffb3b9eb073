using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests.Audit;

/// <summary>Accesses made here must show in the audit trail, read back as valid R4 AuditEvents by an administrator only.</summary>
public sealed class AuditEventEndpointsTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private const string SubjectSystem = "https://measureeval.example.org/fhir/NamingSystem/token-subject";

    [Fact]
    public async System.Threading.Tasks.Task SearchAsync_PatientReadByAnalyst_ShowsAnalystAndPatient()
    {
        var admin = factory.CreateClient();
        (await admin.PutAsync("/Patient/audit-read-1", Json(Patient("audit-read-1")))).EnsureSuccessStatusCode();
        var analyst = Client("analyst");

        var read = await analyst.GetAsync("/Patient/audit-read-1");
        var events = await SearchAsync(admin, "/AuditEvent?patient=Patient/audit-read-1");

        Assert.Equal(HttpStatusCode.OK, read.StatusCode);
        var readEvent = Assert.Single(events, e => Agent(e) == "test-analyst");
        // R4 AuditEvent: type from audit-event-type ("rest"), subtype a restful-interaction code, action R for a read.
        Assert.Equal(("http://terminology.hl7.org/CodeSystem/audit-event-type", "rest"), (readEvent.Type.System, readEvent.Type.Code));
        Assert.Contains(readEvent.Subtype, c => c.System == "http://hl7.org/fhir/restful-interaction" && c.Code == "read");
        Assert.Equal(AuditEvent.AuditEventAction.R, readEvent.Action);
        Assert.Equal(AuditEvent.AuditEventOutcome.N0, readEvent.Outcome);
        Assert.True(readEvent.Agent[0].Requestor);
        Assert.Contains(readEvent.Entity, e => e.What?.Reference == "Patient/audit-read-1" && e.Role?.Code == "1");
        // The admin's PUT of the same patient was recorded too, as an update.
        Assert.Contains(events, e => Agent(e) == "test-admin" && e.Action == AuditEvent.AuditEventAction.U);
        Assert.All(events, e => Assert.Empty(BaseR4Validator.Shared.Errors(e)));
    }

    [Fact]
    public async System.Threading.Tasks.Task SearchAsync_RefusedRequests_AreRecordedWithStatus()
    {
        var admin = factory.CreateClient();
        (await admin.PutAsync("/Patient/audit-refused-1", Json(Patient("audit-refused-1")))).EnsureSuccessStatusCode();
        var payer = factory.CreateClient();
        payer.DefaultRequestHeaders.Authorization = TestTokens.Header("payer", "cedar-valley");
        var claimless = factory.CreateClient();
        claimless.DefaultRequestHeaders.Authorization = new("Bearer", TestTokens.Mint("payer", subject: "payer-without-claim"));

        var notMember = await payer.GetAsync("/Patient/audit-refused-1");
        var forbidden = await claimless.GetAsync("/Patient/audit-refused-1");
        var missing = await Client("analyst").GetAsync("/Patient/audit-missing-1");
        var events = await SearchAsync(admin, "/AuditEvent?agent=test-payer");
        var refusedEvents = await SearchAsync(admin, "/AuditEvent?agent=payer-without-claim");
        var analystEvents = await SearchAsync(admin, "/AuditEvent?agent=test-analyst");

        // Not the plan's member: answered as unknown, recorded with the plan as a second agent.
        Assert.Equal(HttpStatusCode.NotFound, notMember.StatusCode);
        var hidden = Assert.Single(events, e => e.OutcomeDesc == "HTTP 404");
        Assert.Contains(hidden.Agent, a => a.Who?.Reference == "Organization/cedar-valley" && a.Requestor == false);
        // A payer token without its payer claim is refused by authorization, before any handler: still recorded.
        Assert.Equal(HttpStatusCode.Forbidden, forbidden.StatusCode);
        var refused = Assert.Single(refusedEvents, e => e.OutcomeDesc == "HTTP 403");
        // audit-event-outcome 4: minor failure (the request was refused).
        Assert.Equal(AuditEvent.AuditEventOutcome.N4, refused.Outcome);
        Assert.Equal(HttpStatusCode.NotFound, missing.StatusCode);
        Assert.Contains(analystEvents, e => e.OutcomeDesc == "HTTP 404" && e.Outcome == AuditEvent.AuditEventOutcome.N4);
    }

    [Fact]
    public async System.Threading.Tasks.Task SearchAsync_DatePrefixesAndCount_PageNewestFirst()
    {
        var admin = factory.CreateClient();
        for (var i = 0; i < 3; i++)
        {
            (await Client("analyst").GetAsync($"/Patient?_id=audit-page-{i}")).EnsureSuccessStatusCode();
        }

        var page = await ReadAsync<Bundle>(await admin.GetAsync("/AuditEvent?agent=test-analyst&date=ge2020-01-01&date=le2100-12-31&_count=2"));
        var none = await ReadAsync<Bundle>(await admin.GetAsync("/AuditEvent?date=lt2000-01-01"));
        var bad = await admin.GetAsync("/AuditEvent?date=ap2020-01-01");

        Assert.Equal(2, page.Entry.Count);
        Assert.Contains(page.Link, l => l.Relation == "next" && l.Url.Contains("_offset=2", StringComparison.Ordinal));
        var recorded = page.Entry.Select(e => ((AuditEvent)e.Resource).Recorded!.Value).ToList();
        Assert.True(recorded[0] >= recorded[1]);
        Assert.Equal(0, none.Total);
        Assert.Equal(HttpStatusCode.BadRequest, bad.StatusCode);
        Assert.Equal(["MEV-SEARCH-003"], Codes(await ReadAsync<OperationOutcome>(bad)));
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadAsync_OneEvent_AdminOnly()
    {
        var admin = factory.CreateClient();
        (await Client("analyst").GetAsync("/Patient?_id=audit-one")).EnsureSuccessStatusCode();
        var id = (await SearchAsync(admin, "/AuditEvent?agent=test-analyst&_count=1"))[0].Id;

        var read = await admin.GetAsync($"/AuditEvent/{id}");
        var byAnalyst = await Client("analyst").GetAsync($"/AuditEvent/{id}");
        var searchByAnalyst = await Client("analyst").GetAsync("/AuditEvent");
        var unknown = await admin.GetAsync("/AuditEvent/0000");

        Assert.Equal(HttpStatusCode.OK, read.StatusCode);
        Assert.Equal(id, (await ReadAsync<AuditEvent>(read)).Id);
        Assert.Equal(HttpStatusCode.Forbidden, byAnalyst.StatusCode);
        Assert.Equal(HttpStatusCode.Forbidden, searchByAnalyst.StatusCode);
        Assert.Equal(HttpStatusCode.NotFound, unknown.StatusCode);
    }

    [Theory]
    [InlineData("analyst", "GET", "/AuditEvent/x/_history")]
    [InlineData("analyst", "GET", "/AuditEvent/x/_history/1")]
    [InlineData("analyst", "POST", "/AuditEvent/_search")]
    [InlineData("ingest", "POST", "/AuditEvent")]
    [InlineData("ingest", "PUT", "/AuditEvent/x")]
    [InlineData("ingest", "DELETE", "/AuditEvent/x")]
    public async System.Threading.Tasks.Task GenericRoutes_AuditEvent_Refused(string role, string method, string path)
    {
        var client = Client(role);
        using var request = new HttpRequestMessage(new HttpMethod(method), path);
        if (method is "POST" or "PUT")
        {
            request.Content = path.EndsWith("_search", StringComparison.Ordinal)
                ? new FormUrlEncodedContent([])
                : Json(new AuditEvent { Id = "x" });
        }

        var response = await client.SendAsync(request);

        Assert.Equal(HttpStatusCode.MethodNotAllowed, response.StatusCode);
        Assert.Equal(["MEV-AUDIT-002"], Codes(await ReadAsync<OperationOutcome>(response)));
    }

    private HttpClient Client(string role)
    {
        var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = TestTokens.Header(role);
        return client;
    }

    private static async System.Threading.Tasks.Task<List<AuditEvent>> SearchAsync(HttpClient admin, string url)
    {
        var response = await admin.GetAsync(url);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var bundle = await ReadAsync<Bundle>(response);
        return [.. bundle.Entry.Select(e => e.Resource).OfType<AuditEvent>()];
    }

    private static string? Agent(AuditEvent e) => e.Agent.FirstOrDefault(a => a.Requestor == true)?.Who?.Identifier is { System: SubjectSystem } id ? id.Value : null;
}
