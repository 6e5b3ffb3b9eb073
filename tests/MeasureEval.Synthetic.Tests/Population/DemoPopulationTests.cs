using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Output;
using MeasureEval.Synthetic.Population;
using MeasureEval.Testing;

namespace MeasureEval.Synthetic.Tests.Population;

public class DemoPopulationTests
{
    private static string DemoDirectory => Path.Combine(RepositoryRoot.Path, DemoPopulation.RelativeDirectory);

    private static IEnumerable<string> CommittedBundles() =>
        Directory.GetFiles(DemoDirectory, "bundle-*.json").Select(Path.GetFileName).OfType<string>().Order(StringComparer.Ordinal);

    [Fact]
    public void Options_RegeneratedNow_EqualTheCommittedFilesByteForByte()
    {
        using var dir = new TempDirectory();
        var summary = BundlePopulationWriter.Write(new PopulationGenerator(DemoPopulation.Options), dir.Path);
        Assert.Equal(summary.Files, CommittedBundles());
        Assert.All(summary.Files, f => Assert.True(
            File.ReadAllBytes(Path.Combine(dir.Path, f)).AsSpan().SequenceEqual(File.ReadAllBytes(Path.Combine(DemoDirectory, f))),
            $"{f} differs from the generator's output: regenerate with the command in {DemoPopulation.RelativeDirectory}/README.md"));
    }

    [Fact]
    public void Options_CommittedBundles_EveryResourceValidAgainstBaseR4()
    {
        var errors = new List<string>();
        var resources = 0;
        foreach (var file in CommittedBundles())
        {
            // Validating the bundle validates each entry's resource too; issues carry the entry's location.
            var bundle = FhirJson.Parse<Bundle>(File.ReadAllText(Path.Combine(DemoDirectory, file)));
            resources += bundle.Entry.Count;
            errors.AddRange(BaseR4Validator.Shared.Errors(bundle).Select(e => $"{file}: {e}"));
        }

        Assert.True(resources > 5000, $"{resources} resources");
        Assert.Empty(errors);
    }
}
