using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Options;
using Npgsql;

namespace MeasureEval.Storage;

/// <summary>Rejects at start what would otherwise fail on the first request. Collects every problem.</summary>
public sealed class StorageOptionsValidator : IValidateOptions<StorageOptions>
{
    public ValidateOptionsResult Validate(string? name, StorageOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        var failures = new List<string>();
        switch (options.Provider)
        {
            case StorageProvider.Sqlite:
                ValidateSqlite(options.ConnectionString, failures);
                break;
            case StorageProvider.Postgres:
                ValidatePostgres(options.ConnectionString, failures);
                break;
            default:
                failures.Add($"Storage:Provider '{options.Provider}' is not one of Sqlite, Postgres.");
                break;
        }

        return failures.Count == 0 ? ValidateOptionsResult.Success : ValidateOptionsResult.Fail(failures);
    }

    private static void ValidateSqlite(string? connectionString, List<string> failures)
    {
        if (string.IsNullOrWhiteSpace(connectionString))
        {
            return;
        }

        SqliteConnectionStringBuilder builder;
        try
        {
            builder = new SqliteConnectionStringBuilder(connectionString);
        }
        catch (ArgumentException ex)
        {
            failures.Add($"Storage:ConnectionString is not a valid SQLite connection string: {ex.Message}");
            return;
        }

        if (string.IsNullOrWhiteSpace(builder.DataSource))
        {
            failures.Add("Storage:ConnectionString names no Data Source file.");
        }

        // Every pooled connection to an in-memory database sees a different database.
        if (builder.Mode == SqliteOpenMode.Memory || string.Equals(builder.DataSource, ":memory:", StringComparison.Ordinal))
        {
            failures.Add("Storage:ConnectionString must name a file: in-memory SQLite databases are not supported.");
        }

        if (builder.Mode == SqliteOpenMode.ReadOnly)
        {
            failures.Add("Storage:ConnectionString must not open the database read-only.");
        }
    }

    private static void ValidatePostgres(string? connectionString, List<string> failures)
    {
        if (string.IsNullOrWhiteSpace(connectionString))
        {
            failures.Add("Storage:ConnectionString is required when Storage:Provider is Postgres.");
            return;
        }

        try
        {
            var builder = new NpgsqlConnectionStringBuilder(connectionString);
            if (string.IsNullOrWhiteSpace(builder.Host))
            {
                failures.Add("Storage:ConnectionString names no Host.");
            }

            if (string.IsNullOrWhiteSpace(builder.Database))
            {
                failures.Add("Storage:ConnectionString names no Database.");
            }
        }
        catch (ArgumentException ex)
        {
            failures.Add($"Storage:ConnectionString is not a valid PostgreSQL connection string: {ex.Message}");
        }
    }
}
