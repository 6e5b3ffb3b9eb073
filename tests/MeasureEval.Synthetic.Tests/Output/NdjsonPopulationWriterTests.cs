using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Output;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Tests.Output;

public class NdjsonPopulationWriterTests
{
    private static PopulationOptions Options(ulong seed) => new() { Patients = 600, Seed = seed, AsOf = new DateOnly(2026, 11, 30) };

    private static Dictionary<string, byte[]> Write(PopulationOptions options, string directory)
    {
        NdjsonPopulationWriter.Write(new PopulationGenerator(options), directory);
        return Directory.GetFiles(directory).ToDictionary(f => Path.GetFileName(f), File.ReadAllBytes, StringComparer.Ordinal);
    }

    [Fact]
    public void Write_SameSeedTwice_IdenticalBytes()
    {
        using var a = new TempDirectory();
        using var b = new TempDirectory();
        var first = Write(Options(7), a.Path);
        var second = Write(Options(7), b.Path);
        Assert.Equal(first.Keys.Order(StringComparer.Ordinal), second.Keys.Order(StringComparer.Ordinal));
        Assert.All(first, file => Assert.Equal(file.Value, second[file.Key]));
    }

    [Fact]
    public void Write_DifferentSeed_DifferentBytes()
    {
        using var a = new TempDirectory();
        using var b = new TempDirectory();
        var first = Write(Options(7), a.Path);
        var second = Write(Options(8), b.Path);
        Assert.NotEqual(first["Patient.ndjson"], second["Patient.ndjson"]);
    }

    [Fact]
    public void Write_EveryLine_IsOneStrictlyParsedResourceOfTheFilesType()
    {
        using var dir = new TempDirectory();
        var summary = NdjsonPopulationWriter.Write(new PopulationGenerator(Options(3)), dir.Path);
        foreach (var file in summary.Files)
        {
            var type = file[..^".ndjson".Length];
            var lines = File.ReadAllText(Path.Combine(dir.Path, file)).Split('\n');
            // Bulk Data NDJSON: one resource per line, each line ended by \\n (so the last split part is empty).
            Assert.Equal(string.Empty, lines[^1]);
            Assert.Equal(summary.ResourcesByType[type], lines.Length - 1);
            Assert.All(lines[..^1], line => Assert.Equal(type, FhirJson.Parse<Hl7.Fhir.Model.Resource>(line).TypeName));
        }
    }
}
