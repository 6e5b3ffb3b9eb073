using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Engine.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>Every case fixture is a valid base FHIR R4 collection holding exactly one patient and only that patient's records.</summary>
public sealed class CaseFixtureTests
{
    public static TheoryData<string> CaseFiles()
    {
        var data = new TheoryData<string>();
        foreach (var file in Directory.EnumerateFiles(MeasureHarness.CasesDirectory, "*.json", SearchOption.AllDirectories).Order(StringComparer.Ordinal))
        {
            data.Add(Path.GetRelativePath(MeasureHarness.CasesDirectory, file));
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(CaseFiles))]
    public void Validate_CaseFixture(string relativePath)
    {
        var bundle = MeasureHarness.LoadCase(Path.Combine(MeasureHarness.CasesDirectory, relativePath));

        Assert.Equal(Bundle.BundleType.Collection, bundle.Type);
        Assert.All(bundle.Entry, e => Assert.NotNull(e.Resource));
        var resources = bundle.Entry.Select(e => e.Resource).OfType<Resource>().ToList();
        Assert.Empty(resources.SelectMany(r => BaseR4Validator.Shared.Errors(r).Select(error => $"{r.TypeName}/{r.Id}: {error}")));
        var patient = Assert.Single(resources.OfType<Patient>());
        // Every other entry must be indexed for that patient, or the case would test less than it claims.
        foreach (var resource in resources.Where(r => r is not Patient))
        {
            Assert.True(FactExtractor.TryExtract(resource, out var contribution), $"{resource.TypeName}/{resource.Id} is not indexed");
            Assert.Equal(patient.Id, contribution!.PatientId);
        }
    }
}
