namespace MeasureEval.Reliability.Tests.Support;

/// <summary>The checkout this test binary was built from (the folder holding MeasureEval.sln).</summary>
public static class RepositoryRoot
{
    public static string Path { get; } = Find();

    private static string Find()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(System.IO.Path.Combine(dir.FullName, "MeasureEval.sln")))
            {
                return dir.FullName;
            }
        }

        throw new InvalidOperationException("MeasureEval.sln not found above " + AppContext.BaseDirectory);
    }
}
