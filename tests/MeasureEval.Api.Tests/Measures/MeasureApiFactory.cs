using Microsoft.AspNetCore.Hosting;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Mvc.Testing;

namespace MeasureEval.Api.Tests.Measures;

/// <summary>The service on a throwaway SQLite file; a second factory on the same file sees what the first stored.</summary>
public sealed class MeasureApiFactory(string databaseFile) : WebApplicationFactory<Program>
{
    public string DatabaseFile { get; } = databaseFile;

    public static string NewDatabaseFile() => Path.Combine(Path.GetTempPath(), $"measureeval-measures-{Guid.NewGuid():N}.db");

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        builder.UseSetting("Storage:Provider", "Sqlite").UseSetting("Storage:ConnectionString", $"Data Source={DatabaseFile}");
        foreach (var (key, value) in TestTokens.Settings)
        {
            builder.UseSetting(key, value);
        }
    }

    /// <summary>Clients act as an administrator (measures and value sets are loaded here).</summary>
    protected override void ConfigureClient(HttpClient client)
    {
        base.ConfigureClient(client);
        client.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");
    }
}
