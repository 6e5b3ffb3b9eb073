namespace MeasureEval.Engine.Tests.Support;

/// <summary>Finds the checked-in measure definitions from a test's base directory.</summary>
public static class RepositoryPaths
{
    /// <summary>The directory holding MeasureEval.sln, found by walking up from the test's base directory.</summary>
    public static string Root
    {
        get
        {
            var directory = new DirectoryInfo(AppContext.BaseDirectory);
            while (directory is not null && !File.Exists(Path.Combine(directory.FullName, "MeasureEval.sln")))
            {
                directory = directory.Parent;
            }

            return directory?.FullName ?? throw new InvalidOperationException($"no MeasureEval.sln above {AppContext.BaseDirectory}");
        }
    }

    /// <summary>The repository's measures/ directory.</summary>
    public static string MeasuresDirectory => Path.Combine(Root, "measures");

    private static readonly Lazy<(MeasureRepository Repository, IReadOnlyList<DefinitionIssue> Issues)> Shared = new(() =>
    {
        var repository = MeasureRepository.Load(MeasuresDirectory, out var issues);
        return (repository, issues);
    });

    /// <summary>The checked-in measures, loaded once per test run.</summary>
    public static MeasureRepository Repository => Shared.Value.Repository;

    /// <summary>Issues found loading the checked-in measures (expected: none).</summary>
    public static IReadOnlyList<DefinitionIssue> RepositoryIssues => Shared.Value.Issues;
}
