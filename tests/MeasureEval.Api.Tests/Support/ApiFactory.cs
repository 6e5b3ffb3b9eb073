using MeasureEval.Testing;

namespace MeasureEval.Api.Tests.Support;

/// <summary>The real service over a real SQLite store in a temporary file, one per test class.</summary>
public class ApiFactory : TemporarySqliteServiceFactory<Program>;

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
