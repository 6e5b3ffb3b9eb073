using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;

namespace MeasureEval.Core.Storage;

/// <summary>
/// The durable FHIR store: versioned resources, their history, search, and the per-patient
/// evaluation index kept at write time. Implementations: SQLite (default) and PostgreSQL.
/// </summary>
/// <remarks>
/// Every read takes a <see cref="DataScope"/>: what lies outside it answers exactly as if it were not stored (null, no
/// versions, no match), so a caller cannot tell another payer's patient from an unknown id. Write sessions are unscoped.
/// </remarks>
public interface IResourceStore
{
    /// <summary>Creates or migrates the schema. Safe to call on every start.</summary>
    System.Threading.Tasks.Task InitializeAsync(CancellationToken cancellationToken);

    /// <summary>True when the store answers a trivial query.</summary>
    System.Threading.Tasks.Task<bool> IsReadyAsync(CancellationToken cancellationToken);

    /// <summary>The current version (a deleted resource comes back with <see cref="StoredResource.Deleted"/>), or null if never stored or outside the scope.</summary>
    System.Threading.Tasks.Task<StoredResource?> ReadAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<StoredResource?> ReadVersionAsync(string resourceType, string id, int versionId, DataScope scope, CancellationToken cancellationToken);

    /// <summary>Every version in the scope, newest first (deletions included).</summary>
    System.Threading.Tasks.Task<IReadOnlyList<StoredResource>> HistoryAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken);

    /// <summary>Current, not deleted resources matching the query, within <see cref="SearchQuery.Scope"/>.</summary>
    System.Threading.Tasks.Task<SearchResult> SearchAsync(SearchQuery query, CancellationToken cancellationToken);

    /// <summary>
    /// Opens an all-or-nothing unit of writes. Nothing is visible to readers until <see cref="IStoreSession.CommitAsync"/>;
    /// disposing without commit rolls everything back.
    /// </summary>
    System.Threading.Tasks.Task<IStoreSession> BeginWriteAsync(CancellationToken cancellationToken);

    /// <summary>
    /// One patient's index entry, or null when nothing is stored for that patient or the patient is outside the scope.
    /// For a payer the entry keeps only the Coverages (and payor references) of that payer.
    /// </summary>
    System.Threading.Tasks.Task<PatientFacts?> GetPatientFactsAsync(string patientId, DataScope scope, CancellationToken cancellationToken);

    /// <summary>
    /// How many patients in the scope have an index entry (what a full <see cref="StreamPatientFactsAsync"/> with the same
    /// scope yields), for progress reports.
    /// </summary>
    System.Threading.Tasks.Task<long> CountPatientFactsAsync(DataScope scope, CancellationToken cancellationToken);

    /// <summary>
    /// Streams index entries in ascending patient id order: all patients in the scope when <paramref name="patientIds"/>
    /// is null, otherwise just those (unknown and out-of-scope ids are skipped). Memory does not grow with the population.
    /// </summary>
    IAsyncEnumerable<PatientFacts> StreamPatientFactsAsync(IReadOnlyCollection<string>? patientIds, DataScope scope, CancellationToken cancellationToken);

    /// <summary>
    /// Streams the index entries of one patient partition (<see cref="Partitions.PatientPartitioner.PartitionOf"/> =
    /// <paramref name="partition"/>) in the scope, in ascending patient id order, reading only that partition's rows (a
    /// range of the entries' stored partition key). The partitions 0 … <paramref name="partitionCount"/> − 1 are disjoint
    /// and together are <see cref="StreamPatientFactsAsync"/> of everyone in the scope.
    /// </summary>
    IAsyncEnumerable<PatientFacts> StreamPartitionFactsAsync(int partition, int partitionCount, DataScope scope, CancellationToken cancellationToken);
}

/// <summary>A write unit. Reads and searches through it see its own uncommitted writes (conditional create inside a transaction).</summary>
public interface IStoreSession : IAsyncDisposable
{
    /// <summary>Stores a new resource under a server-assigned id (the resource's own id is ignored and replaced).</summary>
    System.Threading.Tasks.Task<StoredResource> CreateAsync(Resource resource, CancellationToken cancellationToken);

    /// <summary>
    /// Creates or updates the resource under its own id (update-as-create allowed). Returns false with the current
    /// version in <paramref name="current"/> when <paramref name="ifMatchVersion"/> is given and is not the current version.
    /// </summary>
    System.Threading.Tasks.Task<WriteResult> UpdateAsync(Resource resource, int? ifMatchVersion, CancellationToken cancellationToken);

    /// <summary>Marks the resource deleted (a new version with no body). Deleting what does not exist succeeds with no version.</summary>
    System.Threading.Tasks.Task<WriteResult> DeleteAsync(string resourceType, string id, int? ifMatchVersion, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<StoredResource?> ReadAsync(string resourceType, string id, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<SearchResult> SearchAsync(SearchQuery query, CancellationToken cancellationToken);

    /// <summary>
    /// Call before the search of a conditional create: other sessions locking an equal condition wait until this session
    /// ends, so two of them cannot both find no match and both create. Where sessions already run one at a time
    /// (SQLite) this does nothing.
    /// </summary>
    System.Threading.Tasks.Task LockConditionAsync(SearchQuery condition, CancellationToken cancellationToken);

    System.Threading.Tasks.Task CommitAsync(CancellationToken cancellationToken);
}

/// <summary>One stored version. <see cref="Json"/> carries meta.versionId and meta.lastUpdated; it is null for a deletion.</summary>
public sealed record StoredResource(string ResourceType, string Id, int VersionId, DateTimeOffset LastUpdated, bool Deleted, string? Json);

/// <summary>
/// Outcome of an update or delete. <see cref="VersionConflict"/> is true (and nothing was written) when If-Match named a
/// version other than the current one; <see cref="Stored"/> then holds the current version, if any.
/// <see cref="Created"/> is true when an update created the resource.
/// </summary>
public sealed record WriteResult(StoredResource? Stored, bool Created, bool VersionConflict);

/// <summary>
/// A search on one type. Each non-null criterion must hold (AND); values inside one list are alternatives (OR),
/// except <see cref="LastUpdated"/> and <see cref="LastUpdatedNotIn"/> whose ranges must all hold.
/// </summary>
public sealed record SearchQuery(string ResourceType)
{
    /// <summary>Whose data may match: required, so that no search forgets the caller.</summary>
    public required DataScope Scope { get; init; }

    public IReadOnlyList<string>? Ids { get; init; }

    /// <summary>Half-open instant ranges [From, Until) that lastUpdated must fall in; a null bound is open.</summary>
    public IReadOnlyList<InstantRange>? LastUpdated { get; init; }

    /// <summary>Half-open instant ranges [From, Until) that lastUpdated must each fall outside (a <c>ne</c> prefix).</summary>
    public IReadOnlyList<InstantRange>? LastUpdatedNotIn { get; init; }

    /// <summary>The patient the resource belongs to (patient/subject/beneficiary search, or the Patient itself).</summary>
    public string? PatientId { get; init; }

    /// <summary>identifier tokens: system|value, |value (no system) or value (any system).</summary>
    public IReadOnlyList<TokenValue>? Identifiers { get; init; }

    public int Count { get; init; } = 50;

    public int Offset { get; init; }
}

public sealed record InstantRange(DateTimeOffset? From, DateTimeOffset? Until);

/// <summary>A token. <see cref="System"/> null: any system; empty string: no system.</summary>
public sealed record TokenValue(string? System, string Value);

/// <summary>A page of matches, ordered by resource id, and the total across all pages.</summary>
public sealed record SearchResult(IReadOnlyList<StoredResource> Matches, int Total);
