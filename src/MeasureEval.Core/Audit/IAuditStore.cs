namespace MeasureEval.Core.Audit;

/// <summary>
/// The audit trail, kept in its own tables beside the resources (never readable as a stored resource). Appends are
/// durable when the task completes: callers that must not answer unaudited wait for it.
/// </summary>
public interface IAuditStore
{
    System.Threading.Tasks.Task AppendAsync(AuditRecord record, CancellationToken cancellationToken);

    /// <summary>
    /// Adds patients to an event already appended (a streamed export learns them while it writes) and sets its final
    /// status and patient count.
    /// </summary>
    System.Threading.Tasks.Task CompleteAsync(string id, IReadOnlyList<string> morePatients, int patientCount, int status, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<AuditRecord?> ReadAuditAsync(string id, CancellationToken cancellationToken);

    System.Threading.Tasks.Task<AuditSearchResult> SearchAuditAsync(AuditQuery query, CancellationToken cancellationToken);
}
