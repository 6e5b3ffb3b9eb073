using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Output;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Tests.Output;

public class BundlePopulationWriterTests
{
    private static PopulationOptions Options(ulong seed) => new() { Patients = 120, Seed = seed, AsOf = new DateOnly(2026, 11, 30), PatientsPerBundle = 50 };

    [Fact]
    public void Write_SameSeedTwice_IdenticalBytes()
    {
        using var a = new TempDirectory();
        using var b = new TempDirectory();
        var first = BundlePopulationWriter.Write(new PopulationGenerator(Options(5)), a.Path);
        BundlePopulationWriter.Write(new PopulationGenerator(Options(5)), b.Path);
        Assert.All(first.Files, f => Assert.Equal(File.ReadAllBytes(Path.Combine(a.Path, f)), File.ReadAllBytes(Path.Combine(b.Path, f))));
    }

    [Fact]
    public void Write_DifferentSeed_DifferentBytes()
    {
        using var a = new TempDirectory();
        using var b = new TempDirectory();
        BundlePopulationWriter.Write(new PopulationGenerator(Options(5)), a.Path);
        BundlePopulationWriter.Write(new PopulationGenerator(Options(6)), b.Path);
        Assert.NotEqual(File.ReadAllBytes(Path.Combine(a.Path, "bundle-0001.json")), File.ReadAllBytes(Path.Combine(b.Path, "bundle-0001.json")));
    }

    [Fact]
    public void Write_120Patients_SharedBundleThenOnePerFiftyPatients()
    {
        using var dir = new TempDirectory();
        var summary = BundlePopulationWriter.Write(new PopulationGenerator(Options(5)), dir.Path);
        Assert.Equal(["bundle-0000.json", "bundle-0001.json", "bundle-0002.json", "bundle-0003.json"], summary.Files);
        var patientsPerBundle = summary.Files.Skip(1)
            .Select(f => FhirJson.Parse<Bundle>(File.ReadAllText(Path.Combine(dir.Path, f))).Entry.Count(e => e.Resource is Patient))
            .ToArray();
        Assert.Equal([50, 50, 20], patientsPerBundle);
    }

    [Fact]
    public void Write_EveryEntry_IsAnIdempotentPutWithUuidFullUrl()
    {
        using var dir = new TempDirectory();
        var summary = BundlePopulationWriter.Write(new PopulationGenerator(Options(5)), dir.Path);
        foreach (var file in summary.Files)
        {
            var bundle = FhirJson.Parse<Bundle>(File.ReadAllText(Path.Combine(dir.Path, file)));
            Assert.Equal(Bundle.BundleType.Transaction, bundle.Type);
            Assert.All(bundle.Entry, e =>
            {
                // A urn:uuid fullUrl must hold a real UUID (FHIR R4 bundle rules); it names the same resource the PUT writes.
                Assert.True(Guid.TryParse(e.FullUrl!["urn:uuid:".Length..], out _), e.FullUrl);
                Assert.Equal($"urn:uuid:{e.Resource!.Id}", e.FullUrl);
                Assert.Equal(Bundle.HTTPVerb.PUT, e.Request!.Method);
                Assert.Equal($"{e.Resource.TypeName}/{e.Resource.Id}", e.Request.Url);
            });
        }
    }
}
