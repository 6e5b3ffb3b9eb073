namespace MeasureEval.Synthetic.Tests;

/// <summary>Finds the repository checkout the tests run from (the folder holding MeasureEval.sln).</summary>
internal static class RepositoryRoot
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

/// <summary>A temporary directory removed on dispose.</summary>
internal sealed class TempDirectory : IDisposable
{
    public TempDirectory() => Directory.CreateDirectory(Path);

    public string Path { get; } = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "measureeval-synthetic-" + Guid.NewGuid().ToString("N"));

    public void Dispose() => Directory.Delete(Path, recursive: true);
}
