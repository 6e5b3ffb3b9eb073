using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.Analytics;

/// <summary>Error codes of the report endpoints, in the catalogue's code system and numbering scheme.</summary>
public static class ReportErrorCodes
{
    public static readonly ErrorCode InvalidParameter = new("MEV-REPORT-001", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.Value, 400, "Invalid report parameter");
    public static readonly ErrorCode UnknownMeasure = new("MEV-REPORT-002", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.NotFound, 404, "Unknown measure");

    public static IReadOnlyList<ErrorCode> All { get; } = [InvalidParameter, UnknownMeasure];
}
