using MeasureEval.Core.Storage;
using MeasureEval.Storage.Common;
using MeasureEval.Storage.Postgres;
using MeasureEval.Storage.Sqlite;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;

namespace MeasureEval.Storage;

public static class StorageServiceCollectionExtensions
{
    /// <summary>
    /// Registers <see cref="IResourceStore"/> (one per process) chosen by configuration section <c>Storage</c>, validated at
    /// start, and a hosted service that creates or migrates the schema before the host serves.
    /// </summary>
    public static IServiceCollection AddMeasureEvalStorage(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddOptions<StorageOptions>().BindConfiguration(StorageOptions.SectionName).ValidateOnStart();
        services.TryAddEnumerable(ServiceDescriptor.Singleton<IValidateOptions<StorageOptions>, StorageOptionsValidator>());
        services.TryAddSingleton(TimeProvider.System);
        services.TryAddSingleton<SqlResourceStore>(CreateStore);
        services.TryAddSingleton<IResourceStore>(sp => sp.GetRequiredService<SqlResourceStore>());
        services.TryAddSingleton<IJobStore>(sp => new SqlJobStore(sp.GetRequiredService<SqlResourceStore>()));
        services.AddHostedService<StorageInitializer>();
        return services;
    }

    private static SqlResourceStore CreateStore(IServiceProvider services)
    {
        var options = services.GetRequiredService<IOptions<StorageOptions>>().Value;
        var timeProvider = services.GetRequiredService<TimeProvider>();
        var loggers = services.GetRequiredService<ILoggerFactory>();
        var contentRoot = services.GetService<IHostEnvironment>()?.ContentRootPath ?? Directory.GetCurrentDirectory();
        return options.Provider switch
        {
            StorageProvider.Postgres => new PostgresResourceStore(
                options.ConnectionString ?? throw new OptionsValidationException(StorageOptions.SectionName, typeof(StorageOptions), ["Storage:ConnectionString is required."]),
                timeProvider,
                loggers.CreateLogger<PostgresResourceStore>()),
            _ => new SqliteResourceStore(SqliteConnectionString(options.ConnectionString, contentRoot), timeProvider, loggers.CreateLogger<SqliteResourceStore>()),
        };
    }

    /// <summary>The configured connection string (or the default file) with a relative file resolved against the content root.</summary>
    internal static string SqliteConnectionString(string? configured, string contentRoot)
    {
        var builder = string.IsNullOrWhiteSpace(configured)
            ? new SqliteConnectionStringBuilder { DataSource = StorageOptions.DefaultSqliteFile }
            : new SqliteConnectionStringBuilder(configured);
        builder.DataSource = Path.GetFullPath(builder.DataSource, contentRoot);
        return builder.ToString();
    }
}
