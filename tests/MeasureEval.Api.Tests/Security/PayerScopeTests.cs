using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Hl7.Fhir.Model;
using MeasureEval.Api.Security;
using MeasureEval.Core.Fhir;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;
using Task = System.Threading.Tasks.Task;
using F = MeasureEval.Api.Tests.Security.PayerScopeFixture;

namespace MeasureEval.Api.Tests.Security;

/// <summary>
/// Payer A's token against payer B's member, by every route that returns patient data. The rule (issue 6): a payer sees
/// only its members; another payer's patient answers as if it did not exist.
/// </summary>
public sealed class PayerScopeTests(F fixture) : IClassFixture<F>
{
    private const string Period = $"periodStart={F.PeriodStart}&periodEnd={F.PeriodEnd}";
    private const string AllStatuses = "status=open-gap&status=closed-gap&status=prospective-gap&status=not-applicable";

    /// <summary>
    /// How a probe is judged. Individual: asks for one patient by id; B's answer must equal (status and body, ids
    /// replaced) the answer for an id that does not exist, and A's must show A. Listing: lists patients; the analyst's
    /// answer shows B (so a leak would show), the payer's does not. Aggregate: counts only; they must equal the analyst's
    /// evaluation over A's members, and no other payer may appear as a stratum.
    /// </summary>
    public enum Kind { Individual, Listing, Aggregate }

    /// <summary>One request. <see cref="Route"/> is the endpoint's method and route pattern, as the app maps it.</summary>
    /// <remarks><see cref="ListsA"/>: the answer lists A too (not when filtered to B's panel or payer). <see cref="ShowsStrata"/>: payer strata are shown (not on the HTML index, which shows overall rates only).</remarks>
    public sealed record Probe(string Route, Kind Kind, string Name, Func<ProbeSubject, HttpRequestMessage> Request, bool ListsA = true, bool ShowsStrata = true);

    private static readonly Probe[] Probes =
    [
        Get("GET /{type}/{id}", Kind.Individual, "read Patient", s => $"/Patient/{s.PatientId}"),
        Get("GET /{type}/{id}", Kind.Individual, "read Observation", s => $"/Observation/{s.ObservationId}"),
        Get("GET /{type}/{id}", Kind.Individual, "read Coverage", s => $"/Coverage/{s.CoverageId}"),
        Get("GET /{type}/{id}", Kind.Individual, "read Group", s => $"/Group/{s.GroupId}"),
        Get("GET /{type}/{id}/_history/{vid}", Kind.Individual, "vread Patient", s => $"/Patient/{s.PatientId}/_history/1"),
        Get("GET /{type}/{id}/_history/{vid}", Kind.Individual, "vread Observation", s => $"/Observation/{s.ObservationId}/_history/1"),
        Get("GET /{type}/{id}/_history", Kind.Individual, "history Patient", s => $"/Patient/{s.PatientId}/_history"),
        Get("GET /{type}/{id}/_history", Kind.Individual, "history Observation", s => $"/Observation/{s.ObservationId}/_history"),
        Get("GET /{type}", Kind.Individual, "search Patient by _id", s => $"/Patient?_id={s.PatientId}"),
        Get("GET /{type}", Kind.Individual, "search Patient by identifier", s => $"/Patient?identifier={Uri.EscapeDataString(s.MrnSystem + "|" + s.Mrn)}"),
        Get("GET /{type}", Kind.Individual, "search Observation by patient", s => $"/Observation?patient=Patient/{s.PatientId}"),
        Get("GET /{type}", Kind.Individual, "search Encounter by subject", s => $"/Encounter?subject={s.PatientId}"),
        Get("GET /{type}", Kind.Individual, "search Coverage by beneficiary", s => $"/Coverage?beneficiary=Patient/{s.PatientId}"),
        Get("GET /{type}", Kind.Listing, "search Patient", _ => "/Patient?_count=1000"),
        Get("GET /{type}", Kind.Listing, "search Observation", _ => "/Observation?_count=1000"),
        Get("GET /{type}", Kind.Listing, "search Coverage", _ => "/Coverage?_count=1000"),
        Get("GET /{type}", Kind.Listing, "search Group", _ => "/Group?_count=1000"),
        Form("POST /{type}/_search", Kind.Individual, "search Patient by _id (POST)", s => "/Patient/_search", s => [new("_id", s.PatientId)]),
        Form("POST /{type}/_search", Kind.Listing, "search Observation (POST)", _ => "/Observation/_search", _ => [new("_count", "1000")]),
        Get("GET /Measure/{id}/$evaluate-measure", Kind.Individual, "evaluate subject", s => $"/Measure/{F.Measure}/$evaluate-measure?{Period}&subject=Patient/{s.PatientId}"),
        Get("GET /Measure/{id}/$evaluate-measure", Kind.Individual, "evaluate Group subject-list", s => $"/Measure/{F.Measure}/$evaluate-measure?{Period}&subject=Group/{s.GroupId}&reportType=subject-list"),
        Get("GET /Measure/{id}/$evaluate-measure", Kind.Listing, "evaluate subject-list", _ => $"/Measure/{F.Measure}/$evaluate-measure?{Period}&reportType=subject-list"),
        Get("GET /Measure/{id}/$evaluate-measure", Kind.Aggregate, "evaluate population", _ => $"/Measure/{F.Measure}/$evaluate-measure?{Period}&reportType=population"),
        Json("POST /Measure/{id}/$evaluate-measure", Kind.Individual, "evaluate subject (POST)", _ => $"/Measure/{F.Measure}/$evaluate-measure",
            s => Parameters(("periodStart", "valueDate", F.PeriodStart), ("periodEnd", "valueDate", F.PeriodEnd), ("subject", "valueString", $"Patient/{s.PatientId}"))),
        Json("POST /Measure/{id}/$evaluate-measure", Kind.Listing, "evaluate subject-list (POST)", _ => $"/Measure/{F.Measure}/$evaluate-measure",
            _ => Parameters(("periodStart", "valueDate", F.PeriodStart), ("periodEnd", "valueDate", F.PeriodEnd), ("reportType", "valueCode", "subject-list"))),
        Json("POST /Measure/$evaluate-measure", Kind.Individual, "evaluate measures subject", _ => "/Measure/$evaluate-measure",
            s => Parameters(("measureId", "valueString", F.Measure), ("measureId", "valueString", "colorectal-cancer-screening"), ("periodStart", "valueDate", F.PeriodStart),
                ("periodEnd", "valueDate", F.PeriodEnd), ("subject", "valueString", $"Patient/{s.PatientId}"))),
        Json("POST /Measure/$evaluate-measure", Kind.Listing, "evaluate measures subject-list", _ => "/Measure/$evaluate-measure",
            _ => Parameters(("measureId", "valueString", F.Measure), ("periodStart", "valueDate", F.PeriodStart), ("periodEnd", "valueDate", F.PeriodEnd), ("reportType", "valueCode", "subject-list"))),
        Json("POST /Measure/$evaluate-measure", Kind.Aggregate, "evaluate measures population", _ => "/Measure/$evaluate-measure",
            _ => Parameters(("measureId", "valueString", F.Measure), ("periodStart", "valueDate", F.PeriodStart), ("periodEnd", "valueDate", F.PeriodEnd), ("reportType", "valueCode", "population"))),
        Get("GET /Measure/$care-gaps", Kind.Individual, "care gaps of a patient", s => $"/Measure/$care-gaps?{Period}&subject=Patient/{s.PatientId}&{AllStatuses}"),
        Get("GET /Measure/$care-gaps", Kind.Individual, "care gaps of a Group", s => $"/Measure/$care-gaps?{Period}&subject=Group/{s.GroupId}&{AllStatuses}"),
        Get("GET /Measure/$care-gaps", Kind.Listing, "care gaps of everyone", _ => $"/Measure/$care-gaps?{Period}&measureId={F.Measure}&{AllStatuses}"),
        Get("GET /Measure/$care-gaps", Kind.Listing, "care gaps by organization", _ => $"/Measure/$care-gaps?{Period}&organization=Organization/{F.PlanB}&{AllStatuses}", ListsA: false),
        Get("GET /Measure/$care-gaps", Kind.Listing, "care gaps by practitioner", s => $"/Measure/$care-gaps?{Period}&practitioner={s.Practitioner}&{AllStatuses}", ListsA: false),
        Json("POST /Measure/$care-gaps", Kind.Individual, "care gaps of a patient (POST)", _ => "/Measure/$care-gaps",
            s => Parameters(("periodStart", "valueDate", F.PeriodStart), ("periodEnd", "valueDate", F.PeriodEnd), ("subject", "valueString", $"Patient/{s.PatientId}"),
                ("status", "valueCode", "open-gap"), ("status", "valueCode", "closed-gap"), ("status", "valueCode", "not-applicable"), ("status", "valueCode", "prospective-gap"))),
        Json("POST /Measure/$care-gaps", Kind.Listing, "care gaps of everyone (POST)", _ => "/Measure/$care-gaps",
            _ => Parameters(("periodStart", "valueDate", F.PeriodStart), ("periodEnd", "valueDate", F.PeriodEnd), ("measureId", "valueString", F.Measure),
                ("status", "valueCode", "open-gap"), ("status", "valueCode", "closed-gap"), ("status", "valueCode", "not-applicable"), ("status", "valueCode", "prospective-gap"))),
        Get("GET /Measure/$care-gaps-export", Kind.Individual, "export of a patient", s => $"/Measure/$care-gaps-export?{Period}&subject=Patient/{s.PatientId}&{AllStatuses}&_format=csv"),
        Get("GET /Measure/$care-gaps-export", Kind.Listing, "export CSV", _ => $"/Measure/$care-gaps-export?{Period}&measureId={F.Measure}&{AllStatuses}&_format=csv"),
        Get("GET /Measure/$care-gaps-export", Kind.Listing, "export NDJSON", _ => $"/Measure/$care-gaps-export?{Period}&measureId={F.Measure}&{AllStatuses}&_format=ndjson"),
        Get("GET /Measure/$care-gaps-export", Kind.Listing, "export by organization", _ => $"/Measure/$care-gaps-export?{Period}&organization=Organization/{F.PlanB}&{AllStatuses}&_format=csv", ListsA: false),
        Get("GET /Measure/$care-gaps-export", Kind.Listing, "export by practitioner", s => $"/Measure/$care-gaps-export?{Period}&practitioner={s.Practitioner}&{AllStatuses}&_format=csv", ListsA: false),
        Get("GET /reports/", Kind.Aggregate, "report index HTML", _ => $"/reports?{Period}", ShowsStrata: false),
        Get("GET /reports/", Kind.Aggregate, "report index JSON", _ => $"/reports?{Period}&format=json"),
        Get("GET /reports/measures/{id}", Kind.Aggregate, "report page HTML", _ => $"/reports/measures/{F.Measure}?{Period}"),
        Get("GET /reports/measures/{id}", Kind.Aggregate, "report JSON", _ => $"/reports/measures/{F.Measure}?{Period}&format=json"),
        Get("GET /reports/measures/{id}", Kind.Aggregate, "report CSV", _ => $"/reports/measures/{F.Measure}?{Period}&format=csv"),
    ];

    public static TheoryData<string> ProbeNames() => [.. Probes.Select(p => p.Name)];

    [Theory]
    [MemberData(nameof(ProbeNames))]
    public async Task Route_PayerAskingForAnotherPayersMember_SeesNothingOfIt(string name)
    {
        var probe = Probes.Single(p => p.Name == name);
        using var payer = fixture.Client(TestTokens.Header(AccessPolicies.PayerRole, F.PlanA));
        using var analyst = fixture.Client(TestTokens.Header(AccessPolicies.AnalystRole));
        var b = fixture.B.PatientId;
        var a = fixture.A.PatientId;
        switch (probe.Kind)
        {
            case Kind.Individual:
            {
                var asAnalyst = await SendAsync(analyst, probe.Request(fixture.B));
                Assert.True(asAnalyst.Status == HttpStatusCode.OK && asAnalyst.Body.Contains(b, StringComparison.Ordinal), $"the analyst should see B: {(int)asAnalyst.Status}");

                var other = await SendAsync(payer, probe.Request(fixture.B));
                var unknown = await SendAsync(payer, probe.Request(fixture.Unknown));
                Assert.Equal(unknown.Status, other.Status);
                Assert.Equal(Normalize(unknown.Body, fixture.Unknown), Normalize(other.Body, fixture.B));
                Assert.DoesNotContain(b, Normalize(other.Body, fixture.B), StringComparison.Ordinal);

                var own = await SendAsync(payer, probe.Request(fixture.A));
                Assert.Equal(HttpStatusCode.OK, own.Status);
                Assert.Contains(a, own.Body, StringComparison.Ordinal);
                break;
            }

            case Kind.Listing:
            {
                var asAnalyst = await SendAsync(analyst, probe.Request(fixture.B));
                Assert.Equal(HttpStatusCode.OK, asAnalyst.Status);
                Assert.Contains(b, asAnalyst.Body, StringComparison.Ordinal);

                var asPayer = await SendAsync(payer, probe.Request(fixture.B));
                Assert.Equal(HttpStatusCode.OK, asPayer.Status);
                Assert.DoesNotContain(b, asPayer.Body, StringComparison.Ordinal);
                if (probe.ListsA)
                {
                    Assert.Contains(a, asPayer.Body, StringComparison.Ordinal);
                }

                break;
            }

            case Kind.Aggregate:
            {
                var asAnalyst = await SendAsync(analyst, probe.Request(fixture.B));
                var asPayer = await SendAsync(payer, probe.Request(fixture.B));
                Assert.Equal(HttpStatusCode.OK, asPayer.Status);
                Assert.DoesNotContain(b, asPayer.Body, StringComparison.Ordinal);

                // Strata: the analyst's numbers show plan B (by id or by name); the payer's never do, and show plan A.
                Assert.DoesNotContain(F.PlanB, asPayer.Body, StringComparison.Ordinal);
                Assert.DoesNotContain(F.PlanBName, asPayer.Body, StringComparison.Ordinal);
                if (probe.ShowsStrata)
                {
                    Assert.True(asAnalyst.Body.Contains(F.PlanB, StringComparison.Ordinal) || asAnalyst.Body.Contains(F.PlanBName, StringComparison.Ordinal), "the analyst should see plan B's stratum");
                    Assert.True(asPayer.Body.Contains(F.PlanA, StringComparison.Ordinal) || asPayer.Body.Contains(F.PlanAName, StringComparison.Ordinal), "plan A's own stratum");
                }
                await AssertCountsOfPlanAMembersAsync(analyst, asPayer.Body);
                break;
            }
        }
    }

    /// <summary>
    /// The status URL of an asynchronous job answers only the caller who started it (same sub; 404 for anyone else, a
    /// payer included), and the job ran in that caller's scope: tested in Jobs/JobRunnerTests and the reliability AsyncJobTests.
    /// </summary>
    private static readonly string[] JobRoutes = ["GET /jobs/{id}", "DELETE /jobs/{id}"];

    [Fact]
    public void Route_EveryPatientDataEndpoint_IsProbed()
    {
        var source = fixture.Services.GetRequiredService<EndpointDataSource>();
        var missing = new List<string>();
        foreach (var endpoint in source.Endpoints.OfType<RouteEndpoint>())
        {
            var policy = endpoint.Metadata.GetOrderedMetadata<IAuthorizeData>().Select(a => a.Policy).LastOrDefault(p => p is not null);
            if (policy != AccessPolicies.PatientData)
            {
                continue;
            }

            foreach (var method in endpoint.Metadata.GetMetadata<HttpMethodMetadata>()?.HttpMethods ?? ["GET"])
            {
                var route = $"{method} /{(endpoint.RoutePattern.RawText ?? "").TrimStart('/')}";
                if (!Probes.Any(p => p.Route == route) && !JobRoutes.Contains(route))
                {
                    missing.Add(route);
                }
            }
        }

        Assert.Empty(missing);
    }

    [Fact]
    public async Task Route_PayerTokenWithoutPayerClaim_Answers403()
    {
        using var client = fixture.Client(TestTokens.Header(AccessPolicies.PayerRole));
        using var response = await client.GetAsync(new Uri($"/Patient/{fixture.A.PatientId}", UriKind.Relative));

        Assert.Equal(HttpStatusCode.Forbidden, response.StatusCode);
        Assert.Contains("MEV-AUTH-002", await response.Content.ReadAsStringAsync(), StringComparison.Ordinal);
    }

    /// <summary>
    /// The payer's numbers for the measure equal an analyst's evaluation over plan A's members during the period (the
    /// fixture's Group, built from the bundle's Coverages): B is not counted, and no A member is left out.
    /// </summary>
    private async Task AssertCountsOfPlanAMembersAsync(HttpClient analyst, string payerBody)
    {
        var expected = await analyst.GetStringAsync(new Uri($"/Measure/{F.Measure}/$evaluate-measure?{Period}&subject=Group/{F.PlanAMembersGroup}&reportType=population", UriKind.Relative));
        var counts = Counts(FhirJson.Parse<MeasureReport>(expected));
        Assert.True(counts["initial-population"] > 0, "plan A has members in the measure");
        var trimmed = payerBody.TrimStart();
        if (trimmed.StartsWith('{') && JsonNode.Parse(trimmed) is JsonObject root && root["resourceType"] is not null)
        {
            var resource = FhirJson.Parse<Resource>(trimmed);
            var report = resource as MeasureReport ?? ((Bundle)resource).Entry.Select(e => e.Resource).OfType<MeasureReport>().Single(r => r.Measure.Contains(F.Measure, StringComparison.Ordinal));
            Assert.Equal(counts, Counts(report));
        }
        else if (trimmed.StartsWith('[') || trimmed.StartsWith('{'))
        {
            // Report JSON: the measure's overall rate (camel-cased RateSummary).
            var node = JsonNode.Parse(trimmed)!;
            var summary = node is JsonArray all ? all.Single(m => (string?)m!["measureId"] == F.Measure)! : node["summary"]!;
            var overall = summary["overall"]!;
            Assert.Equal(counts["initial-population"], (int)overall["initialPopulation"]!);
            Assert.Equal(counts["denominator"], (int)overall["denominator"]!);
            Assert.Equal(counts["numerator"], (int)overall["numerator"]!);
        }
    }

    private static Dictionary<string, int> Counts(MeasureReport report) =>
        report.Group[0].Population.ToDictionary(p => p.Code.Coding[0].Code, p => p.Count ?? 0, StringComparer.Ordinal);

    /// <summary>The body with the subject's ids replaced by placeholders and the parts that differ per answer (ids, dates) removed.</summary>
    private static string Normalize(string body, ProbeSubject subject)
    {
        var text = body.Replace(subject.PatientId, "{patient}", StringComparison.Ordinal)
            .Replace(subject.ObservationId, "{observation}", StringComparison.Ordinal)
            .Replace(subject.CoverageId, "{coverage}", StringComparison.Ordinal)
            .Replace(subject.GroupId, "{group}", StringComparison.Ordinal)
            .Replace(Uri.EscapeDataString(subject.Mrn), "{mrn}", StringComparison.Ordinal)
            .Replace(subject.Mrn, "{mrn}", StringComparison.Ordinal);
        if (JsonNode.Parse(text) is JsonObject root)
        {
            root.Remove("id");
            root.Remove("meta");
            root.Remove("date");
            return root.ToJsonString();
        }

        return text;
    }

    private static async Task<(HttpStatusCode Status, string Body)> SendAsync(HttpClient client, HttpRequestMessage request)
    {
        using (request)
        using (var response = await client.SendAsync(request))
        {
            return (response.StatusCode, await response.Content.ReadAsStringAsync());
        }
    }

    private static Probe Get(string route, Kind kind, string name, Func<ProbeSubject, string> path, bool ListsA = true, bool ShowsStrata = true) =>
        new(route, kind, name, s => new HttpRequestMessage(HttpMethod.Get, path(s)), ListsA, ShowsStrata);

    private static Probe Form(string route, Kind kind, string name, Func<ProbeSubject, string> path, Func<ProbeSubject, KeyValuePair<string, string>[]> form) =>
        new(route, kind, name, s => new HttpRequestMessage(HttpMethod.Post, path(s)) { Content = new FormUrlEncodedContent(form(s)) });

    private static Probe Json(string route, Kind kind, string name, Func<ProbeSubject, string> path, Func<ProbeSubject, string> json) =>
        new(route, kind, name, s => new HttpRequestMessage(HttpMethod.Post, path(s)) { Content = new StringContent(json(s), Encoding.UTF8, "application/fhir+json") });

    private static string Parameters(params (string Name, string Type, string Value)[] parameters) =>
        new JsonObject
        {
            ["resourceType"] = "Parameters",
            ["parameter"] = new JsonArray([.. parameters.Select(p => (JsonNode)new JsonObject { ["name"] = p.Name, [p.Type] = p.Value })]),
        }.ToJsonString();
}
