using System.Text.Json;
using MeasureEval.Api.Demo;
using MeasureEval.Api.Tests.Support;
using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Tests.Demo;

/// <summary>The service started with the demo switch, as the README's main-job command starts it.</summary>
public sealed class DemoApiFactory : ApiFactory
{
    protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?> { ["Demo:Load"] = "true" };
}

public sealed class DemoLoaderTests(DemoApiFactory factory) : IClassFixture<DemoApiFactory>
{
    [Fact]
    public async System.Threading.Tasks.Task Loaded_DemoSwitch_StoresEveryDemoPatient()
    {
        var client = factory.CreateClient();
        var loaded = await factory.Services.GetRequiredService<DemoLoader>().Loaded.WaitAsync(TimeSpan.FromMinutes(3));

        Assert.True(loaded);
        using var search = JsonDocument.Parse(await client.GetStringAsync("/Patient?_count=0"));
        Assert.Equal(PatientsInDemoFiles(), search.RootElement.GetProperty("total").GetInt32());
    }

    [Fact]
    public void ExpandDemoFlag_BareSwitch_BecomesConfiguration()
    {
        var expanded = DemoServiceCollectionExtensions.ExpandDemoFlag(["--urls", "http://127.0.0.1:8080", "--demo"]);

        Assert.Equal(["--urls", "http://127.0.0.1:8080", "--Demo:Load=true"], expanded);
    }

    /// <summary>Counted from the committed files themselves, independently of the loader.</summary>
    private static int PatientsInDemoFiles()
    {
        var folder = FindDemoFolder();
        return Directory.GetFiles(folder, "*.json").Sum(file =>
        {
            using var bundle = JsonDocument.Parse(File.ReadAllBytes(file));
            return bundle.RootElement.GetProperty("entry").EnumerateArray()
                .Count(e => e.GetProperty("resource").GetProperty("resourceType").GetString() == "Patient");
        });
    }

    private static string FindDemoFolder()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            var candidate = Path.Combine(dir.FullName, "fhir-bundles", "demo");
            if (Directory.Exists(candidate))
            {
                return candidate;
            }
        }

        throw new DirectoryNotFoundException("fhir-bundles/demo not found above the test output folder.");
    }
}
