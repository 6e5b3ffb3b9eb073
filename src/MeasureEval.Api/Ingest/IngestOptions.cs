using System.ComponentModel.DataAnnotations;

namespace MeasureEval.Api.Ingest;

/// <summary>Limits on request bodies (configuration section <c>Ingest</c>).</summary>
public sealed class IngestOptions
{
    public const string Section = "Ingest";

    /// <summary>Largest body accepted by the non-streaming interactions (create, update, transaction, batch); larger → 413.</summary>
    [Range(1024, long.MaxValue)]
    public long MaxBodyBytes { get; set; } = 50L * 1024 * 1024;

    /// <summary>Largest body read by the streaming <c>$ingest</c> operation (EHR exports are large).</summary>
    [Range(1024, long.MaxValue)]
    public long MaxStreamBytes { get; set; } = 4L * 1024 * 1024 * 1024;

    /// <summary>Deepest JSON nesting accepted; deeper → 400 (protects the parser's stack).</summary>
    [Range(8, 1000)]
    public int MaxJsonDepth { get; set; } = 64;

    /// <summary>
    /// Entries accepted in one transaction or batch Bundle (<c>POST /</c>); more → 413. A transaction is one store session
    /// held for all its entries, so this bounds how long one request keeps other writers waiting. <c>$ingest</c> streams
    /// and is not limited by it.
    /// </summary>
    [Range(1, 1_000_000)]
    public int MaxBundleEntries { get; set; } = 10_000;

    /// <summary>Resources committed per store session by <c>$ingest</c>.</summary>
    [Range(1, 100_000)]
    public int BulkBatchSize { get; set; } = 1000;
}
