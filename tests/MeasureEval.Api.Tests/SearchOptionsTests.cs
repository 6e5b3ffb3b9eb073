using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>Paging limits (section Search), with a small maximum set by the factory.</summary>
public sealed class SearchOptionsTests(SmallLimitsApiFactory factory) : IClassFixture<SmallLimitsApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task MaxPageSize_LargerCount_Lowered()
    {
        var response = await _client.GetAsync("/Patient?_count=500");

        var bundle = await ReadAsync<Bundle>(response);
        Assert.Contains("_count=5&", bundle.SelfLink!.ToString(), StringComparison.Ordinal);
    }
}
