using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Definitions;

public sealed class MeasureRepositoryTests
{
    [Fact]
    public void Load_CheckedInMeasures_LoadAllNineWithoutIssues()
    {
        Assert.Equal("", string.Join("\n", RepositoryPaths.RepositoryIssues.Select(i => $"{i.File} {i.Path}: {i.Message}")));
        string[] expected =
        [
            "breast-cancer-screening", "cervical-cancer-screening", "colorectal-cancer-screening", "depression-screening", "diabetes-a1c-above-9",
            "diabetes-a1c-below-8", "hypertension-bp-below-140-90", "immunizations-by-age-2", "influenza-vaccination",
        ];
        Assert.Equal(expected, RepositoryPaths.Repository.Measures.Select(m => m.Id));
    }
}
