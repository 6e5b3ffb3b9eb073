using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;
using static MeasureEval.Api.Tests.Support.Fhir;
using Interaction = Hl7.Fhir.Model.CapabilityStatement.TypeRestfulInteraction;

namespace MeasureEval.Api.Tests;

public sealed class CapabilityEndpointsTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Metadata_Get_ValidR4CapabilityStatement()
    {
        var response = await _client.GetAsync("/metadata");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var statement = await ReadAsync<CapabilityStatement>(response);
        Assert.Equal(FHIRVersion.N4_0_1, statement.FhirVersion);
        Assert.Empty(BaseR4Validator.Shared.Errors(statement));
    }

    [Fact]
    public async System.Threading.Tasks.Task Metadata_Get_ListsWhatIsMapped()
    {
        var statement = await ReadAsync<CapabilityStatement>(await _client.GetAsync("/metadata"));

        var rest = statement.Rest.Single();
        Assert.Equal(
            [CapabilityStatement.SystemRestfulInteraction.Transaction, CapabilityStatement.SystemRestfulInteraction.Batch],
            rest.Interaction.Select(i => i.Code!.Value).Order());
        Assert.Contains(rest.Operation, o => o.Name == "ingest");
        var patient = rest.Resource.Single(r => r.Type == "Patient");
        Assert.Equal(
            new[] { Interaction.Read, Interaction.Vread, Interaction.Update, Interaction.Delete, Interaction.HistoryInstance, Interaction.Create, Interaction.SearchType }.Order(),
            patient.Interaction.Select(i => i.Code!.Value).Order());
        Assert.Equal(["_id", "_lastUpdated", "identifier"], patient.SearchParam.Select(p => p.Name));
        Assert.Equal(["_id", "_lastUpdated", "patient", "subject"], rest.Resource.Single(r => r.Type == "Observation").SearchParam.Select(p => p.Name));
        Assert.Equal(["_id", "_lastUpdated", "beneficiary", "patient"], rest.Resource.Single(r => r.Type == "Coverage").SearchParam.Select(p => p.Name));
        Assert.DoesNotContain(rest.Resource, r => r.Interaction.Any(i => i.Code == Interaction.Patch));
    }
}
