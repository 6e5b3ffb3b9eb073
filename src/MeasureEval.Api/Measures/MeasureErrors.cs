using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.Measures;

/// <summary>Stable error codes of the measure endpoints (same code system as the <see cref="ErrorCatalogue"/>).</summary>
public static class MeasureErrors
{
    public static readonly ErrorCode InvalidParameter = new("MEV-MEASURE-001", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.Value, 400, "Invalid operation parameter");
    public static readonly ErrorCode UnknownMeasure = new("MEV-MEASURE-002", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.NotFound, 404, "Measure not known");
    public static readonly ErrorCode UnknownSubject = new("MEV-MEASURE-003", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.NotFound, 404, "Subject not known");
    public static readonly ErrorCode InvalidDefinition = new("MEV-MEASURE-004", OperationOutcome.IssueSeverity.Error, OperationOutcome.IssueType.Invalid, 400, "Invalid measure definition or value set");

    public static IReadOnlyList<ErrorCode> All { get; } = [InvalidParameter, UnknownMeasure, UnknownSubject, InvalidDefinition];
}
