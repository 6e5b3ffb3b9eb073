using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.Jobs;

/// <summary>Stable codes of the asynchronous request pattern (same code system as the <see cref="ErrorCatalogue"/>).</summary>
public static class JobErrors
{
    public static readonly ErrorCode NotFound = new("MEV-JOB-001", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.NotFound, 404, "No such job (unknown, started by another caller, or deleted after its retention)");
    public static readonly ErrorCode Accepted = new("MEV-JOB-002", OperationOutcome.IssueSeverity.Information, OperationOutcome.IssueType.Informational, 202, "Request accepted; poll Content-Location");
    public static readonly ErrorCode Cancelled = new("MEV-JOB-003", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.Deleted, 404, "Job cancelled");
    public static readonly ErrorCode CancelAccepted = new("MEV-JOB-004", OperationOutcome.IssueSeverity.Information, OperationOutcome.IssueType.Informational, 202, "Cancellation accepted");
    public static readonly ErrorCode Abandoned = new("MEV-JOB-005", OperationOutcome.IssueSeverity.Fatal, OperationOutcome.IssueType.Exception, 500, "Job failed: the service stopped during every attempt");

    public static IReadOnlyList<ErrorCode> All { get; } = [NotFound, Accepted, Cancelled, CancelAccepted, Abandoned];
}
