namespace MeasureEval.Core.Fhir;

/// <summary>What went wrong while reading FHIR JSON, coarse enough to map onto stable error codes.</summary>
public enum FhirParseIssueKind
{
    /// <summary>Not well-formed JSON (the reader gave up; nothing after this point was read).</summary>
    Syntax,

    /// <summary>Objects or arrays nested deeper than the configured limit.</summary>
    TooDeep,

    /// <summary>A missing, unknown or wrongly cased resourceType.</summary>
    ResourceType,

    /// <summary>An element the resource type does not define.</summary>
    UnknownElement,

    /// <summary>A primitive value that is not a valid literal of its type (date, code, decimal, id, uri ...).</summary>
    InvalidValue,

    /// <summary>Anything else the strict parser objects to (empty objects, cardinality, JSON shape).</summary>
    Structure,
}

/// <summary>
/// One parse problem. <see cref="Path"/> is a FHIRPath-like instance location (<c>Bundle.entry[3].resource.birthDate</c>);
/// <see cref="Line"/> and <see cref="Position"/> are 1-based and relative to the parsed text.
/// </summary>
public sealed record FhirParseIssue(FhirParseIssueKind Kind, string SourceCode, string Path, long? Line, long? Position, string Message);
