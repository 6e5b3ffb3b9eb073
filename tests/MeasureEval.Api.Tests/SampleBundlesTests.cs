using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Core.Fhir;
using MeasureEval.Testing;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>The demo bundles under fhir-bundles/ are valid R4 and load as transactions, repeatably.</summary>
public sealed class SampleBundlesTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    public static TheoryData<string> Files() => [.. Directory.GetFiles(Path.Combine(AppContext.BaseDirectory, "fhir-bundles"), "*.json").Select(Path.GetFileName).Order(StringComparer.Ordinal)!];

    [Theory]
    [MemberData(nameof(Files))]
    public void Bundle_EveryResource_ValidAgainstBaseR4(string file)
    {
        var json = File.ReadAllBytes(Path.Combine(AppContext.BaseDirectory, "fhir-bundles", file));

        Assert.True(FhirJson.TryParseResource(json, FhirJson.DefaultMaxDepth, out var resource, out var issues), string.Join("\n", issues));
        var bundle = Assert.IsType<Bundle>(resource);
        Assert.Equal(Bundle.BundleType.Transaction, bundle.Type);
        Assert.Empty(BaseR4Validator.Shared.Errors(bundle));
        foreach (var entry in bundle.Entry)
        {
            Assert.StartsWith("urn:uuid:", entry.FullUrl, StringComparison.Ordinal);
            Assert.Empty(BaseR4Validator.Shared.Errors(entry.Resource));
        }
    }

    [Theory]
    [MemberData(nameof(Files))]
    public async System.Threading.Tasks.Task Bundle_PostedTwice_StoredOnceWithoutDuplicatePatients(string file)
    {
        var client = factory.CreateClient();
        var json = await File.ReadAllTextAsync(Path.Combine(AppContext.BaseDirectory, "fhir-bundles", file));

        var first = await client.PostAsync("/", Json(json));
        var second = await client.PostAsync("/", Json(json));

        Assert.Equal(HttpStatusCode.OK, first.StatusCode);
        Assert.Equal(HttpStatusCode.OK, second.StatusCode);
        var firstResult = await ReadAsync<Bundle>(first);
        var secondResult = await ReadAsync<Bundle>(second);
        // The clinic's shared entries may exist already (the other bundle PUTs them too): 200 or 201.
        Assert.All(firstResult.Entry, e => Assert.Matches("^20[01] ", e.Response.Status));
        var patientLocations = firstResult.Entry.Select(e => e.Response.Location).Where(l => l.StartsWith("Patient/", StringComparison.Ordinal)).ToList();
        Assert.NotEmpty(patientLocations);
        Assert.Equal(patientLocations, secondResult.Entry.Select(e => e.Response.Location).Where(l => l.StartsWith("Patient/", StringComparison.Ordinal)));
        var coverage = await ReadAsync<Coverage>(await client.GetAsync("/" + firstResult.Entry.First(e => e.Response.Location.StartsWith("Coverage/", StringComparison.Ordinal)).Response.Location));
        Assert.StartsWith("Patient/", coverage.Beneficiary.Reference, StringComparison.Ordinal);
    }
}
