using Hl7.Fhir.Model;
using Hl7.Fhir.Rest;
using MeasureEval.Api.Tests.Support;

namespace MeasureEval.Api.Tests;

/// <summary>The service driven by the Firely SDK's own FHIR client: what a third-party integration would do.</summary>
public sealed class FhirClientEndToEndTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    [Fact]
    public async System.Threading.Tasks.Task FhirClient_TransactionReadUpdateSearchMetadata_Work()
    {
        var http = factory.CreateClient();
        using var client = new FhirClient(http.BaseAddress!, http, new FhirClientSettings { PreferredFormat = ResourceFormat.Json, ReturnPreference = ReturnPreference.Representation });

        var transaction = new Bundle { Type = Bundle.BundleType.Transaction };
        var patientUrl = "urn:uuid:0f1e2d3c-4b5a-4968-8776-655443322110";
        transaction.Entry.Add(new Bundle.EntryComponent
        {
            FullUrl = patientUrl,
            Resource = Support.Fhir.Patient(identifier: "E2E-1"),
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.POST, Url = "Patient" },
        });
        for (var i = 0; i < 5; i++)
        {
            transaction.Entry.Add(new Bundle.EntryComponent
            {
                Resource = new Observation
                {
                    Status = ObservationStatus.Final,
                    Code = new CodeableConcept("http://loinc.org", "8867-4", "Heart rate"),
                    Subject = new ResourceReference(patientUrl),
                    Value = new Quantity(60 + i, "/min"),
                },
                Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.POST, Url = "Observation" },
            });
        }

        var response = await client.TransactionAsync(transaction);
        Assert.NotNull(response);
        Assert.Equal(6, response.Entry.Count);
        var patientLocation = response.Entry[0].Response.Location.Split("/_history/")[0];

        var patient = await client.ReadAsync<Patient>(patientLocation);
        Assert.NotNull(patient);
        Assert.Equal("1", patient.Meta.VersionId);

        patient.Identifier.Add(new Identifier("http://cedarvalley.example.org/member", "CV-9"));
        var updated = await client.UpdateAsync(patient, versionAware: true);
        Assert.Equal("2", updated!.Meta.VersionId);

        var first = await client.ReadAsync<Patient>($"{patientLocation}/_history/1");
        Assert.Single(first!.Identifier);

        // A second versionAware update of the stale copy must be refused (If-Match W/"1").
        await Assert.ThrowsAsync<FhirOperationException>(() => client.UpdateAsync(first, versionAware: true));

        var page = await client.SearchAsync<Observation>([$"patient={patientLocation}"], pageSize: 2);
        var ids = new List<string>();
        while (page is not null)
        {
            ids.AddRange(page.Entry.Select(e => e.Resource.Id));
            page = await client.ContinueAsync(page);
        }

        Assert.Equal(5, ids.Distinct().Count());

        var capabilities = await client.CapabilityStatementAsync();
        Assert.Equal(FHIRVersion.N4_0_1, capabilities!.FhirVersion);
    }
}
