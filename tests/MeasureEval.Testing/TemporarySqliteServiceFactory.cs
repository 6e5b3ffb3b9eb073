using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Data.Sqlite;

namespace MeasureEval.Testing;

/// <summary>
/// The real service in-process over a SQLite store in its own temporary folder, with the test signing key; clients act
/// as an administrator unless a test sets another token (or none). Subclasses add settings on top.
/// </summary>
public class TemporarySqliteServiceFactory<TEntryPoint> : WebApplicationFactory<TEntryPoint>
    where TEntryPoint : class
{
    private readonly string _directory = Directory.CreateTempSubdirectory("measureeval-").FullName;

    public string DatabasePath => Path.Combine(_directory, "store.db");

    /// <summary>Configuration applied after the store and token settings, so it may override them.</summary>
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
