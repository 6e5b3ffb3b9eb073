using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>Transactions and batches (FHIR R4 http.html "Batch/Transaction", "Transaction Processing Rules").</summary>
public sealed class BundleEndpointsTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Transaction_UrnUuidReferences_RewrittenEverywhere()
    {
        var response = await _client.PostAsync("/", Json(Input("Bundles/linked-transaction.json")));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Bundle>(response);
        Assert.Equal(Bundle.BundleType.TransactionResponse, result.Type);
        Assert.All(result.Entry, e => Assert.Equal("201 Created", e.Response.Status));
        var locations = result.Entry.Select(e => e.Response.Location.Split("/_history/")[0]).ToList();
        Assert.All(result.Entry, e =>
        {
            Assert.Equal("W/\"1\"", e.Response.Etag);
            Assert.NotNull(e.Response.LastModified);
            Assert.EndsWith("/_history/1", e.Response.Location, StringComparison.Ordinal);
        });

        // Entry order in the file: Observation, Encounter, Patient, Practitioner (response keeps that order).
        var (observationRef, encounterRef, patientRef, practitionerRef) = (locations[0], locations[1], locations[2], locations[3]);
        Assert.StartsWith("Observation/", observationRef, StringComparison.Ordinal);
        Assert.StartsWith("Patient/", patientRef, StringComparison.Ordinal);
        var observation = await ReadAsync<Observation>(await _client.GetAsync("/" + observationRef));
        Assert.Equal(patientRef, observation.Subject.Reference);
        Assert.Equal(encounterRef, observation.Encounter.Reference);
        Assert.Equal(practitionerRef, observation.Performer.Single().Reference);
        var nested = (ResourceReference)observation.GetExtension("http://riverbend.example.org/fhir/ext/recorded-by").Value;
        Assert.Equal(practitionerRef, nested.Reference);
        var encounter = await ReadAsync<Encounter>(await _client.GetAsync("/" + encounterRef));
        Assert.Equal(practitionerRef, encounter.Participant.Single().Individual.Reference);
        var patient = await ReadAsync<Patient>(await _client.GetAsync("/" + patientRef));
        Assert.Equal(practitionerRef, patient.GeneralPractitioner.Single().Reference);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_OneStaleIfMatch_StoresNothing()
    {
        await _client.PutAsync("/Patient/tx-lock", Json(Patient("tx-lock")));
        await _client.PutAsync("/Patient/tx-lock", Json(Patient("tx-lock")));
        var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
        bundle.Entry.Add(Put(Patient("tx-new-a")));
        bundle.Entry.Add(new Bundle.EntryComponent
        {
            Resource = Patient(identifier: "TX-ROLLBACK"),
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.POST, Url = "Patient" },
        });
        var stale = Put(Patient("tx-lock", identifier: "LOST"));
        stale.Request.IfMatch = "W/\"1\"";
        bundle.Entry.Add(stale);

        var response = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.PreconditionFailed, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(["Bundle.entry[2].request.ifMatch"], Issue(outcome, "MEV-REQ-007").Expression);
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/tx-new-a")).StatusCode);
        Assert.Equal(0, (await ReadAsync<Bundle>(await _client.GetAsync("/Patient?identifier=TX-ROLLBACK"))).Total);
        Assert.Equal("2", (await ReadAsync<Patient>(await _client.GetAsync("/Patient/tx-lock"))).Meta.VersionId);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_OneInvalidEntry_StoresNothing()
    {
        var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
        bundle.Entry.Add(Put(Patient("tx-bad-a")));
        bundle.Entry.Add(Put(Patient("tx-bad-b")));
        var json = MeasureEval.Core.Fhir.FhirJson.Serialize(bundle)
            .Replace("\"id\":\"tx-bad-b\"", "\"id\":\"tx-bad-b\",\"birthTime\":\"noon\"", StringComparison.Ordinal);

        var response = await _client.PostAsync("/", Json(json));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["Bundle.entry[1].resource.birthTime"], Issue(await ReadAsync<OperationOutcome>(response), "MEV-PARSE-002").Expression);
        Assert.Equal(HttpStatusCode.NotFound, (await _client.GetAsync("/Patient/tx-bad-a")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_AuditEventEntry_RefusedAndNothingStored()
    {
        // AuditEvents are the server's own trail (FHIR R4 auditevent.html: recorded by the system that saw the event),
        // so a client may not post one; the whole transaction fails (http.html "Transaction Processing Rules").
        var response = await _client.PostAsync("/", Json(Input("Bundles/audit-event-transaction.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["Bundle.entry[1].request.url"], Issue(await ReadAsync<OperationOutcome>(response), "MEV-BUNDLE-005").Expression);
        var search = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?identifier=http://ehr.riverbend.example.org/mrn|AUD-TX-1"));
        Assert.Equal(0, search.Total);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_SameConditionalBundleTwice_NoDuplicates()
    {
        var json = Input("Bundles/conditional-transaction.json");

        var first = await ReadAsync<Bundle>(await _client.PostAsync("/", Json(json)));
        var second = await ReadAsync<Bundle>(await _client.PostAsync("/", Json(json)));

        Assert.Equal(["201 Created", "201 Created"], first.Entry.Select(e => e.Response.Status));
        Assert.Equal(["200 OK", "200 OK"], second.Entry.Select(e => e.Response.Status));
        Assert.Equal(first.Entry.Select(e => e.Response.Location), second.Entry.Select(e => e.Response.Location));
        var patients = await ReadAsync<Bundle>(await _client.GetAsync("/Patient?identifier=http://riverbend.example.org/mrn|RCH-COND-7"));
        Assert.Equal(1, patients.Total);
        var coverages = await ReadAsync<Bundle>(await _client.GetAsync($"/Coverage?beneficiary={patients.Entry[0].Resource.Id}"));
        Assert.Equal(1, coverages.Total);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_MixedMethods_ProcessedInFhirOrderAnsweredInRequestOrder()
    {
        await _client.PutAsync("/Patient/order-del", Json(Patient("order-del")));
        var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
        bundle.Entry.Add(new Bundle.EntryComponent { Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.GET, Url = "Patient/order-put" } });
        bundle.Entry.Add(Put(Patient("order-put", identifier: "ORDER")));
        bundle.Entry.Add(new Bundle.EntryComponent { Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.DELETE, Url = "Patient/order-del" } });

        var response = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Bundle>(response);
        Assert.Equal(["200 OK", "201 Created", "204 No Content"], result.Entry.Select(e => e.Response.Status));
        // The GET ran after the PUT although it comes first in the request.
        Assert.Equal("ORDER", ((Patient)result.Entry[0].Resource).Identifier.Single().Value);
        Assert.Equal(HttpStatusCode.Gone, (await _client.GetAsync("/Patient/order-del")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Batch_OneEntryFails_OthersStoredWithPerEntryOutcome()
    {
        await _client.PutAsync("/Patient/batch-lock", Json(Patient("batch-lock")));
        await _client.PutAsync("/Patient/batch-lock", Json(Patient("batch-lock")));
        var bundle = new Bundle { Type = Bundle.BundleType.Batch };
        var stale = Put(Patient("batch-lock"));
        stale.Request.IfMatch = "W/\"1\"";
        bundle.Entry.Add(stale);
        bundle.Entry.Add(Put(Patient("batch-good")));
        bundle.Entry.Add(new Bundle.EntryComponent { Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.GET, Url = "Patient/batch-missing" } });

        var response = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Bundle>(response);
        Assert.Equal(Bundle.BundleType.BatchResponse, result.Type);
        Assert.Equal(["412 Precondition Failed", "201 Created", "404 Not Found"], result.Entry.Select(e => e.Response.Status));
        Assert.Equal(["MEV-REQ-007"], Codes((OperationOutcome)result.Entry[0].Response.Outcome));
        Assert.Equal(["MEV-REQ-005"], Codes((OperationOutcome)result.Entry[2].Response.Outcome));
        Assert.Equal(HttpStatusCode.OK, (await _client.GetAsync("/Patient/batch-good")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task Transaction_PreferRepresentation_ReturnsStoredResources()
    {
        var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
        bundle.Entry.Add(Put(Patient("repr-1")));
        using var request = new HttpRequestMessage(HttpMethod.Post, "/") { Content = Json(bundle) };
        request.Headers.TryAddWithoutValidation("Prefer", "return=representation");

        var result = await ReadAsync<Bundle>(await _client.SendAsync(request));

        Assert.Equal("1", result.Entry.Single().Resource.Meta.VersionId);
    }

    [Fact]
    public async System.Threading.Tasks.Task Process_CollectionBundle_Returns400PointingToIngest()
    {
        var bundle = new Bundle { Type = Bundle.BundleType.Collection };
        bundle.Entry.Add(new Bundle.EntryComponent { Resource = Patient("coll-1") });

        var response = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(["Bundle.type"], Issue(await ReadAsync<OperationOutcome>(response), "MEV-BUNDLE-001").Expression);
    }

    private static Bundle.EntryComponent Put(Resource resource) => new()
    {
        Resource = resource,
        Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.PUT, Url = $"{resource.TypeName}/{resource.Id}" },
    };
}
