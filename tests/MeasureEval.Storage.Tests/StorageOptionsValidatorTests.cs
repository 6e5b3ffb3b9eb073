namespace MeasureEval.Storage.Tests;

public sealed class StorageOptionsValidatorTests
{
    private readonly StorageOptionsValidator _validator = new();

    [Theory]
    [InlineData(StorageProvider.Sqlite, null)]
    [InlineData(StorageProvider.Sqlite, "Data Source=/var/lib/measureeval/store.db")]
    [InlineData(StorageProvider.Postgres, "Host=127.0.0.1;Port=5432;Database=measureeval;Username=measureeval")]
    public void Validate_UsableSettings_Succeeds(StorageProvider provider, string? connectionString)
    {
        var result = _validator.Validate(null, new StorageOptions { Provider = provider, ConnectionString = connectionString });

        Assert.True(result.Succeeded, result.FailureMessage);
    }

    [Theory]
    [InlineData(StorageProvider.Sqlite, "Data Source=:memory:", 1)]
    [InlineData(StorageProvider.Sqlite, "Data Source=store.db;Mode=ReadOnly", 1)]
    [InlineData(StorageProvider.Sqlite, "Flavour=strawberry", 1)]
    [InlineData(StorageProvider.Postgres, null, 1)]
    [InlineData(StorageProvider.Postgres, "Port=5432", 2)]
    [InlineData((StorageProvider)7, null, 1)]
    public void Validate_UnusableSettings_ReportsEveryProblem(StorageProvider provider, string? connectionString, int problems)
    {
        var result = _validator.Validate(null, new StorageOptions { Provider = provider, ConnectionString = connectionString });

        Assert.True(result.Failed);
        Assert.Equal(problems, result.Failures!.Count());
    }
}
