using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using MeasureEval.Testing;
using Microsoft.Data.Sqlite;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>The service in-process over a temporary SQLite file; <see cref="Client"/> is the one place a client gets its credentials.</summary>
public sealed class ReliabilityApiFactory : WebApplicationFactory<Program>
{
    private readonly string _directory = Directory.CreateTempSubdirectory("measureeval-reliability-").FullName;
    private readonly string? _postgres;

    public ReliabilityApiFactory()
    {
    }

    private ReliabilityApiFactory(string postgresConnectionString) => _postgres = postgresConnectionString;

    /// <summary>Over PostgreSQL (a schema of the test server) instead of SQLite.</summary>
    public static ReliabilityApiFactory OnPostgres(string connectionString) => new(connectionString);

    public string DatabasePath => Path.Combine(_directory, "store.db");

    public HttpClient Client()
    {
        var client = CreateClient();
        // Admin: these tests ingest and evaluate with the same client.
        client.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");
        return client;
    }

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        ArgumentNullException.ThrowIfNull(builder);
        builder.UseSetting("Storage:Provider", _postgres is null ? "Sqlite" : "Postgres");
        builder.UseSetting("Storage:ConnectionString", _postgres ?? $"Data Source={DatabasePath}");
        builder.UseSetting("Measures:Directory", Path.Combine(RepositoryRoot.Path, "measures"));
        foreach (var (key, value) in TestTokens.Settings)
        {
            builder.UseSetting(key, value);
        }
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
            // A file still open is left to the OS temp cleanup; not a test failure.
        }
    }
}
