using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using MeasureEval.Testing;
using Microsoft.Data.Sqlite;

namespace MeasureEval.Api.Tests.Support;

/// <summary>The real service over a real SQLite store in a temporary file, one per test class.</summary>
public class ApiFactory : WebApplicationFactory<Program>
{
    private readonly string _directory = Directory.CreateTempSubdirectory("measureeval-api-").FullName;

    public string DatabasePath => Path.Combine(_directory, "store.db");

    /// <summary>Configuration added on top of the defaults (e.g. smaller limits).</summary>
    protected virtual IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>();

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        ArgumentNullException.ThrowIfNull(builder);
        builder.UseSetting("Storage:Provider", "Sqlite");
        builder.UseSetting("Storage:ConnectionString", $"Data Source={DatabasePath}");
        foreach (var (key, value) in TestTokens.Settings)
        {
            builder.UseSetting(key, value);
        }

        foreach (var (key, value) in Settings)
        {
            builder.UseSetting(key, value);
        }
    }

    /// <summary>Clients act as an administrator unless a test sets another token (or none).</summary>
    protected override void ConfigureClient(HttpClient client)
    {
        base.ConfigureClient(client);
        client.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");
    }

    protected override void Dispose(bool disposing)
    {
        base.Dispose(disposing);
        SqliteConnection.ClearAllPools();
        try
        {
            Directory.Delete(_directory, recursive: true);
        }
        catch (IOException)
        {
            // A file still held open is removed with the temp folder by the OS later; not a test failure.
        }
    }
}

/// <summary>Small body and depth limits so that the limit tests need small inputs.</summary>
public sealed class SmallLimitsApiFactory : ApiFactory
{
    protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>
    {
        ["Ingest:MaxBodyBytes"] = "4096",
        ["Ingest:MaxJsonDepth"] = "16",
        ["Ingest:BulkBatchSize"] = "2",
        ["Ingest:MaxBundleEntries"] = "3",
        ["Search:MaxPageSize"] = "5",
    };
}
