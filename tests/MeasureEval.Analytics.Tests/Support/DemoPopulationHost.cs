using System.Net;
using System.Net.Http.Headers;
using MeasureEval.Testing;

namespace MeasureEval.Analytics.Tests.Support;

/// <summary>
/// The real API over a temporary SQLite store holding the committed demo population (fhir-bundles/demo: the invented
/// Riverbend Community Health network, 500 patients, shaped for 2026), loaded once through the transaction endpoint.
/// </summary>
public sealed class DemoPopulationHost : TemporarySqliteServiceFactory<Program>, IAsyncLifetime
{
    public const string Period = "periodStart=2026-01-01&periodEnd=2026-12-31";

    public static string RepositoryRoot
    {
        get
        {
            for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            {
                if (File.Exists(Path.Combine(dir.FullName, "MeasureEval.sln")))
                {
                    return dir.FullName;
                }
            }

            throw new InvalidOperationException($"no MeasureEval.sln above {AppContext.BaseDirectory}");
        }
    }

    public async Task InitializeAsync()
    {
        using var client = CreateClient();
        var bundles = Directory.GetFiles(Path.Combine(RepositoryRoot, "fhir-bundles", "demo"), "bundle-*.json").Order(StringComparer.Ordinal).ToList();
        Assert.NotEmpty(bundles);
        foreach (var file in bundles)
        {
            using var content = new ByteArrayContent(await File.ReadAllBytesAsync(file));
            content.Headers.ContentType = new MediaTypeHeaderValue("application/fhir+json");
            using var response = await client.PostAsync(new Uri("/", UriKind.Relative), content);
            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        }
    }

    Task IAsyncLifetime.DisposeAsync() => Task.CompletedTask;

    protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>
    {
        ["Measures:Directory"] = Path.Combine(RepositoryRoot, "measures"),
    };
}

[CollectionDefinition(Name)]
public sealed class DemoPopulationCollection : ICollectionFixture<DemoPopulationHost>
{
    public const string Name = "demo population";
}
