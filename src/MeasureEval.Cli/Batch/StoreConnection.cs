using MeasureEval.Core.Storage;
using MeasureEval.Storage.Postgres;
using MeasureEval.Storage.Sqlite;
using Microsoft.Extensions.Logging.Abstractions;

namespace MeasureEval.Cli.Batch;

/// <summary>
/// A store named on the command line: <c>sqlite:PATH</c> (a database file, or a full SQLite connection string) or
/// <c>postgres:CONNECTION-STRING</c>.
/// </summary>
internal static class StoreConnection
{
    public const string Syntax = "sqlite:PATH | sqlite:Data Source=PATH;... | postgres:Host=...;Database=...;Username=...";

    public static bool TryOpen(string text, TimeProvider time, out IResourceStore? store, out string? error)
    {
        store = null;
        error = null;
        var colon = text.IndexOf(':', StringComparison.Ordinal);
        var kind = colon > 0 ? text[..colon] : string.Empty;
        var rest = colon > 0 ? text[(colon + 1)..] : string.Empty;
        if (rest.Length == 0)
        {
            error = $"--store must be {Syntax}";
            return false;
        }

        switch (kind)
        {
            case "sqlite":
                var connection = rest.Contains('=', StringComparison.Ordinal) ? rest : $"Data Source={rest}";
                store = new SqliteResourceStore(connection, time, NullLogger<SqliteResourceStore>.Instance);
                return true;
            case "postgres":
                store = new PostgresResourceStore(rest, time, NullLogger<PostgresResourceStore>.Instance);
                return true;
            default:
                error = $"--store must be {Syntax}";
                return false;
        }
    }
}
