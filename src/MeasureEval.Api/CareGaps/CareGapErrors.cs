using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.CareGaps;

/// <summary>Stable error codes of the care-gap endpoints (same code system as the <see cref="ErrorCatalogue"/>).</summary>
public static class CareGapErrors
{
    public static readonly ErrorCode InvalidParameter = new("MEV-GAPS-001", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.Value, 400, "Invalid care-gap parameter");
    public static readonly ErrorCode UnknownMeasure = new("MEV-GAPS-002", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.NotFound, 404, "Measure not known");
    public static readonly ErrorCode UnknownSubject = new("MEV-GAPS-003", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.NotFound, 404, "Subject not known");

    public static IReadOnlyList<ErrorCode> All { get; } = [InvalidParameter, UnknownMeasure, UnknownSubject];
}
