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
        Assert.Empty(bundle.Entry.SelectMany(e => BaseR4Validator.Shared.Errors(e.Resource).Select(error => $"{e.Resource.TypeName}/{e.Resource.Id}: {error}")));
        var patients = bundle.Entry.Select(e => e.Resource).OfType<Patient>().ToList();
        var patient = Assert.Single(patients);
        // Every other entry must be indexed for that patient, or the case would test less than it claims.
        foreach (var resource in bundle.Entry.Select(e => e.Resource).Where(r => r is not Patient))
        {
            Assert.True(FactExtractor.TryExtract(resource, out var contribution), $"{resource.TypeName}/{resource.Id} is not indexed");
            Assert.Equal(patient.Id, contribution!.PatientId);
        }
    }
}
