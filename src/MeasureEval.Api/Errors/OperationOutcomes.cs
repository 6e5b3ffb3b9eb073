using Hl7.Fhir.Model;

namespace MeasureEval.Api.Errors;

public static class OperationOutcomes
{
    public static OperationOutcome From(IEnumerable<FhirIssue> issues) => new() { Issue = [.. issues.Select(i => i.ToComponent())] };

    /// <summary>
    /// The HTTP status for a failed request: the first error's status (issues are collected in reading order,
    /// so the first is the one a client fixes first).
    /// </summary>
    public static int StatusOf(IReadOnlyList<FhirIssue> issues)
    {
        var firstError = issues.FirstOrDefault(i => i.Code.Severity is OperationOutcome.IssueSeverity.Error or OperationOutcome.IssueSeverity.Fatal);
        return firstError?.Code.HttpStatus ?? 200;
    }

    public static bool HasErrors(IEnumerable<FhirIssue> issues) =>
        issues.Any(i => i.Code.Severity is OperationOutcome.IssueSeverity.Error or OperationOutcome.IssueSeverity.Fatal);
}
