using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Definitions;

/// <summary>Broken files beside the checked-in ones: every issue located, nothing half-loaded, the rest serving.</summary>
public sealed class MeasureRepositoryLoadTests
{
    private static (MeasureRepository Repository, IReadOnlyList<DefinitionIssue> Issues) LoadWithBroken()
    {
        var files = new List<DefinitionFile>();
        foreach (var root in new[] { RepositoryPaths.MeasuresDirectory, Path.Combine(AppContext.BaseDirectory, "TestData", "broken") })
        {
            foreach (var path in Directory.EnumerateFiles(root, "*.json", SearchOption.AllDirectories))
            {
                if (DefinitionFile.FromName(Path.GetRelativePath(root, path), File.ReadAllBytes(path)) is { } file)
                {
                    files.Add(file);
                }
            }
        }

        var repository = MeasureRepository.Load(files, out var issues);
        return (repository, issues);
    }

    [Fact]
    public void Load_BrokenMeasure_ReportsEveryIssueAtItsPath()
    {
        var (_, issues) = LoadWithBroken();
        var paths = issues.Where(i => i.File == "broken.measure.json").Select(i => i.Path).Order(StringComparer.Ordinal).ToList();

        Assert.Equal(
        [
            "$.improvementNotation",
            "$.populations.initial-population.all[0].age.on",
            "$.populations.numerator.exists.colour",
        ], paths);
    }

    [Fact]
    public void Load_MalformedJson_ReportsTheFileAndLine()
    {
        var (_, issues) = LoadWithBroken();
        var issue = Assert.Single(issues, i => i.File == "truncated.measure.json");

        Assert.Equal("$", issue.Path);
        Assert.Contains("line 3", issue.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_ValueSetWithUnknownCodeSystem_IsLocatedAndLeftOut()
    {
        var (repository, issues) = LoadWithBroken();

        var issue = Assert.Single(issues, i => i.File == "valuesets/odd-codes.json");
        Assert.Equal("$.compose.include[1].system", issue.Path);
        Assert.False(repository.TryGetValueSet("odd-codes", out _));
    }

    [Fact]
    public void Load_BrokenFiles_LeaveTheNineMeasuresServing()
    {
        var (repository, _) = LoadWithBroken();

        Assert.Equal(9, repository.Measures.Count);
        Assert.False(repository.TryGetMeasure("broken", out _));
    }

    [Fact]
    public void Load_UnknownReferences_AreLocatedOnceSyntaxIsValid()
    {
        // The same measure with its syntax mended: now the references are checked.
        var broken = File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "TestData", "broken", "broken.measure.json"))
            .Replace("\"sideways\"", "\"increase\"", StringComparison.Ordinal)
            .Replace("periodEnd + 3 fortnights", "periodEnd", StringComparison.Ordinal)
            .Replace("\"colour\": \"blue\"", "\"timing\": \"in\"", StringComparison.Ordinal);
        var files = RepositoryPaths.Repository.Files.Append(new DefinitionFile("broken.measure.json", DefinitionFileKind.Measure, System.Text.Encoding.UTF8.GetBytes(broken)));

        MeasureRepository.Load(files, out var issues);

        Assert.Equal(
        [
            "$.populations.initial-population.all[1].definition",
            "$.populations.numerator.exists.valueSet",
        ], issues.Select(i => i.Path).Order(StringComparer.Ordinal));
    }
}
