using MeasureEval.Testing;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>The service in-process over a temporary SQLite file; <see cref="Client"/> is the one place a client gets its credentials.</summary>
public sealed class ReliabilityApiFactory : TemporarySqliteServiceFactory<Program>
{
    private readonly string? _postgres;

    public ReliabilityApiFactory()
    {
    }

    private ReliabilityApiFactory(string postgresConnectionString) => _postgres = postgresConnectionString;

    /// <summary>Over PostgreSQL (a schema of the test server) instead of SQLite.</summary>
    public static ReliabilityApiFactory OnPostgres(string connectionString) => new(connectionString);

    /// <summary>A client with administrator credentials: these tests ingest and evaluate with the same client.</summary>
    public HttpClient Client() => CreateClient();

    protected override IReadOnlyDictionary<string, string?> Settings
    {
        get
        {
            var settings = new Dictionary<string, string?>
            {
                ["Measures:Directory"] = Path.Combine(RepositoryRoot.Path, "measures"),
                // One client sends thousands of requests a minute here (FUZZ_CASES soaks far more): beyond any per-client limit.
                ["Limits:RequestsPerMinute"] = "100000000",
            };
            if (_postgres is not null)
            {
                settings["Storage:Provider"] = "Postgres";
                settings["Storage:ConnectionString"] = _postgres;
            }

            return settings;
        }
    }
}
