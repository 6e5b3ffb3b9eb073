namespace MeasureEval.Storage;

public enum StorageProvider
{
    Sqlite,
    Postgres,
}

/// <summary>Configuration section <c>Storage</c> (environment: <c>Storage__Provider</c>, <c>Storage__ConnectionString</c>).</summary>
public sealed class StorageOptions
{
    public const string SectionName = "Storage";

    /// <summary>The SQLite file used when no connection string is configured, relative to the content root.</summary>
    public const string DefaultSqliteFile = "data/measureeval.db";

    public StorageProvider Provider { get; set; } = StorageProvider.Sqlite;

    /// <summary>
    /// SQLite: an ADO.NET connection string (<c>Data Source=...</c>); empty means <see cref="DefaultSqliteFile"/>.
    /// PostgreSQL: an Npgsql connection string (required).
    /// </summary>
    public string? ConnectionString { get; set; }
}
