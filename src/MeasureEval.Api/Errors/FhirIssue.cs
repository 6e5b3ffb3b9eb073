using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Api.Errors;

/// <summary>One problem found in a request: a catalogue code, what went wrong, and where (a FHIRPath expression).</summary>
public sealed record FhirIssue(ErrorCode Code, string Diagnostics, string? Expression = null, long? Line = null, long? Column = null)
{
    // Core FHIR R4 extensions for a text position (used by the validator for the same purpose).
    public const string LineExtension = "http://hl7.org/fhir/StructureDefinition/operationoutcome-issue-line";
    public const string ColumnExtension = "http://hl7.org/fhir/StructureDefinition/operationoutcome-issue-col";

    public OperationOutcome.IssueComponent ToComponent()
    {
        var component = new OperationOutcome.IssueComponent
        {
            Severity = Code.Severity,
            Code = Code.Type,
            Details = new CodeableConcept(ErrorCatalogue.System, Code.Code, Code.Title),
            Diagnostics = Diagnostics,
        };
        if (!string.IsNullOrEmpty(Expression))
        {
            component.Expression = [Expression];
        }

        if (Line is { } line)
        {
            component.Extension.Add(new Extension(LineExtension, new Integer(checked((int)line))));
        }

        if (Column is { } column)
        {
            component.Extension.Add(new Extension(ColumnExtension, new Integer(checked((int)column))));
        }

        return component;
    }

    /// <summary>
    /// Maps a parser issue. <paramref name="root"/> replaces the resource type at the start of the parser's path
    /// (e.g. "Bundle.entry[3].resource" for an entry parsed on its own); an issue with no path gets the root itself.
    /// Line and column (when <paramref name="withPosition"/>) go into extensions: the expression stays a pure FHIRPath.
    /// </summary>
    public static FhirIssue FromParse(FhirParseIssue issue, string? root = null, bool withPosition = true)
    {
        var code = issue.Kind switch
        {
            FhirParseIssueKind.Syntax => ErrorCatalogue.MalformedJson,
            FhirParseIssueKind.TooDeep => ErrorCatalogue.TooDeep,
            FhirParseIssueKind.ResourceType => ErrorCatalogue.InvalidResourceType,
            FhirParseIssueKind.UnknownElement => ErrorCatalogue.UnknownElement,
            FhirParseIssueKind.InvalidValue => ErrorCatalogue.InvalidValue,
            _ => ErrorCatalogue.InvalidStructure,
        };
        return withPosition
            ? new FhirIssue(code, issue.Message, Rebase(issue.Path, root), issue.Line, issue.Position)
            : new FhirIssue(code, issue.Message, Rebase(issue.Path, root));
    }

    private static string? Rebase(string path, string? root)
    {
        if (root is null)
        {
            return path.Length == 0 ? null : path;
        }

        if (path.Length == 0)
        {
            return root;
        }

        var dot = path.IndexOf('.', StringComparison.Ordinal);
        return dot < 0 ? root : root + path[dot..];
    }
}
