using MeasureEval.Engine.Reports;
using MeasureEval.Engine.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Engine.Tests.Reports;

public sealed class MeasureResourcesTests
{
    [Fact]
    public void ToMeasure_EveryMeasure_ValidatesAgainstBaseR4()
    {
        foreach (var measure in RepositoryPaths.Repository.Measures)
        {
            Assert.Empty(BaseR4Validator.Shared.Errors(MeasureResources.ToMeasure(measure)));
            Assert.Empty(BaseR4Validator.Shared.Errors(MeasureResources.ToLibrary(measure)));
        }

        foreach (var library in RepositoryPaths.Repository.Libraries)
        {
            Assert.Empty(BaseR4Validator.Shared.Errors(MeasureResources.ToLibrary(library)));
        }
    }

    [Fact]
    public void ToLibrary_Measure_CarriesTheDefinitionFileByteForByte()
    {
        var measure = TestPanel.Measure("diabetes-a1c-above-9");
        var library = MeasureResources.ToLibrary(measure);

        Assert.Equal(File.ReadAllBytes(Path.Combine(RepositoryPaths.MeasuresDirectory, "diabetes-a1c-above-9.measure.json")), library.Content[0].Data);
        Assert.Equal("application/vnd.measureeval+json", library.Content[0].ContentType);
    }

    [Fact]
    public void ToMeasure_InverseMeasure_CarriesDecreaseAndPopulationCriteria()
    {
        var resource = MeasureResources.ToMeasure(TestPanel.Measure("diabetes-a1c-above-9"));

        Assert.Equal("decrease", resource.ImprovementNotation!.Coding[0].Code);
        var numerator = resource.Group[0].Population.Single(p => p.Code!.Coding[0].Code == "numerator");
        Assert.Equal("poor-control", numerator.Criteria!.Expression_);
        Assert.Equal("application/vnd.measureeval+json", numerator.Criteria.Language);
    }
}
