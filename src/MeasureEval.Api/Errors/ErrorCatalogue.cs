using Hl7.Fhir.Model;

namespace MeasureEval.Api.Errors;

/// <summary>A stable error code: clients may branch on <see cref="Code"/>; the message text may change.</summary>
public sealed record ErrorCode(string Code, OperationOutcome.IssueSeverity Severity, OperationOutcome.IssueType Type, int HttpStatus, string Title);

/// <summary>
/// Every error and warning code the service emits, in one place. Codes are never reused or renumbered;
/// they appear in OperationOutcome.issue.details.coding under <see cref="System"/>.
/// </summary>
public static class ErrorCatalogue
{
    public const string System = "http://measureeval.example.org/fhir/CodeSystem/error-code";

    private const OperationOutcome.IssueSeverity Error = OperationOutcome.IssueSeverity.Error;
    private const OperationOutcome.IssueSeverity Warning = OperationOutcome.IssueSeverity.Warning;
    private const OperationOutcome.IssueSeverity Information = OperationOutcome.IssueSeverity.Information;

    // Reading the body.
    public static readonly ErrorCode MalformedJson = new("MEV-PARSE-001", Error, OperationOutcome.IssueType.Structure, 400, "Malformed JSON");
    public static readonly ErrorCode UnknownElement = new("MEV-PARSE-002", Error, OperationOutcome.IssueType.Structure, 400, "Unknown element");
    public static readonly ErrorCode InvalidValue = new("MEV-PARSE-003", Error, OperationOutcome.IssueType.Value, 400, "Invalid primitive value");
    public static readonly ErrorCode InvalidResourceType = new("MEV-PARSE-004", Error, OperationOutcome.IssueType.Invalid, 400, "Missing or unknown resourceType");
    public static readonly ErrorCode TooDeep = new("MEV-PARSE-005", Error, OperationOutcome.IssueType.TooCostly, 400, "JSON nested too deeply");
    public static readonly ErrorCode BodyTooLarge = new("MEV-PARSE-006", Error, OperationOutcome.IssueType.TooLong, 413, "Body too large");
    public static readonly ErrorCode InvalidStructure = new("MEV-PARSE-007", Error, OperationOutcome.IssueType.Structure, 400, "Invalid FHIR structure");
    public static readonly ErrorCode EmptyBody = new("MEV-PARSE-008", Error, OperationOutcome.IssueType.Required, 400, "Empty body");

    // Media types and versions.
    public static readonly ErrorCode UnsupportedMediaType = new("MEV-FMT-001", Error, OperationOutcome.IssueType.NotSupported, 415, "Unsupported Content-Type");
    public static readonly ErrorCode NotAcceptable = new("MEV-FMT-002", Error, OperationOutcome.IssueType.NotSupported, 406, "No acceptable response format");
    public static readonly ErrorCode UnsupportedFhirVersionAccept = new("MEV-FMT-003", Error, OperationOutcome.IssueType.NotSupported, 406, "Only FHIR 4.0 can be returned");
    public static readonly ErrorCode UnsupportedFhirVersionContent = new("MEV-FMT-004", Error, OperationOutcome.IssueType.NotSupported, 415, "Only FHIR 4.0 is accepted");

    // The request as a whole.
    public static readonly ErrorCode ResourceTypeMismatch = new("MEV-REQ-001", Error, OperationOutcome.IssueType.Invalid, 400, "Resource type does not match the URL");
    public static readonly ErrorCode IdMismatch = new("MEV-REQ-002", Error, OperationOutcome.IssueType.Invalid, 400, "Resource id does not match the URL");
    public static readonly ErrorCode IdMissing = new("MEV-REQ-003", Error, OperationOutcome.IssueType.Required, 400, "Resource id missing");
    public static readonly ErrorCode UnknownResourceType = new("MEV-REQ-004", Error, OperationOutcome.IssueType.NotSupported, 404, "Unknown resource type");
    public static readonly ErrorCode NotFound = new("MEV-REQ-005", Error, OperationOutcome.IssueType.NotFound, 404, "Resource not found");
    public static readonly ErrorCode Gone = new("MEV-REQ-006", Error, OperationOutcome.IssueType.Deleted, 410, "Resource deleted");
    public static readonly ErrorCode VersionConflict = new("MEV-REQ-007", Error, OperationOutcome.IssueType.Conflict, 412, "If-Match names a version that is not current");
    public static readonly ErrorCode InvalidIfMatch = new("MEV-REQ-008", Error, OperationOutcome.IssueType.Value, 400, "Malformed If-Match");
    public static readonly ErrorCode MultipleMatches = new("MEV-REQ-009", Error, OperationOutcome.IssueType.MultipleMatches, 412, "Conditional create matched several resources");
    public static readonly ErrorCode NoSuchEndpoint = new("MEV-REQ-010", Error, OperationOutcome.IssueType.NotFound, 404, "No such endpoint");
    public static readonly ErrorCode MethodNotAllowed = new("MEV-REQ-011", Error, OperationOutcome.IssueType.NotSupported, 405, "Method not allowed");

    // Bundles.
    public static readonly ErrorCode WrongBundleType = new("MEV-BUNDLE-001", Error, OperationOutcome.IssueType.Invalid, 400, "Bundle type not accepted here");
    public static readonly ErrorCode EntryRequestMissing = new("MEV-BUNDLE-002", Error, OperationOutcome.IssueType.Required, 400, "Entry request incomplete");
    public static readonly ErrorCode DuplicateFullUrl = new("MEV-BUNDLE-003", Error, OperationOutcome.IssueType.Duplicate, 400, "Duplicate fullUrl");
    public static readonly ErrorCode UnresolvedReference = new("MEV-BUNDLE-004", Error, OperationOutcome.IssueType.NotFound, 422, "Reference to a urn:uuid the bundle does not contain");
    public static readonly ErrorCode InvalidEntryUrl = new("MEV-BUNDLE-005", Error, OperationOutcome.IssueType.Value, 400, "Entry request.url not usable");
    public static readonly ErrorCode UnsupportedEntryMethod = new("MEV-BUNDLE-006", Error, OperationOutcome.IssueType.NotSupported, 400, "Entry method or conditional form not supported");
    public static readonly ErrorCode EntryResourceMissing = new("MEV-BUNDLE-007", Error, OperationOutcome.IssueType.Required, 400, "Entry resource missing");
    public static readonly ErrorCode BatchCrossReference = new("MEV-BUNDLE-008", Error, OperationOutcome.IssueType.Invalid, 422, "Batch entries cannot reference each other");
    public static readonly ErrorCode DuplicateTarget = new("MEV-BUNDLE-009", Error, OperationOutcome.IssueType.Duplicate, 400, "Two entries write the same resource");

    // Search.
    public static readonly ErrorCode UnknownSearchParameter = new("MEV-SEARCH-001", Warning, OperationOutcome.IssueType.NotSupported, 400, "Search parameter not supported; ignored");
    public static readonly ErrorCode InvalidSearchValue = new("MEV-SEARCH-002", Error, OperationOutcome.IssueType.Value, 400, "Invalid search value");
    public static readonly ErrorCode UnsupportedSearchForm = new("MEV-SEARCH-003", Error, OperationOutcome.IssueType.NotSupported, 400, "Search modifier, prefix or form not supported");

    // Bulk ingest.
    public static readonly ErrorCode IngestIdMissing = new("MEV-INGEST-001", Error, OperationOutcome.IssueType.Required, 400, "Resource has no id; bulk ingest upserts by id");
    public static readonly ErrorCode IngestSummary = new("MEV-INGEST-002", Information, OperationOutcome.IssueType.Informational, 200, "Ingest summary");
    public static readonly ErrorCode IngestAborted = new("MEV-INGEST-003", Information, OperationOutcome.IssueType.Informational, 200, "Resources stored before the body became unreadable");

    // Authentication and authorization.
    public static readonly ErrorCode Unauthenticated = new("MEV-AUTH-001", Error, OperationOutcome.IssueType.Login, 401, "A valid bearer token is required");
    public static readonly ErrorCode Forbidden = new("MEV-AUTH-002", Error, OperationOutcome.IssueType.Forbidden, 403, "The token's role may not use this endpoint");

    // The service itself.
    public static readonly ErrorCode Unexpected = new("MEV-SRV-001", OperationOutcome.IssueSeverity.Fatal, OperationOutcome.IssueType.Exception, 500, "Unexpected server error");

    public static IReadOnlyList<ErrorCode> All { get; } =
    [
        MalformedJson, UnknownElement, InvalidValue, InvalidResourceType, TooDeep, BodyTooLarge, InvalidStructure, EmptyBody,
        UnsupportedMediaType, NotAcceptable, UnsupportedFhirVersionAccept, UnsupportedFhirVersionContent,
        ResourceTypeMismatch, IdMismatch, IdMissing, UnknownResourceType, NotFound, Gone, VersionConflict, InvalidIfMatch, MultipleMatches, NoSuchEndpoint, MethodNotAllowed,
        WrongBundleType, EntryRequestMissing, DuplicateFullUrl, UnresolvedReference, InvalidEntryUrl, UnsupportedEntryMethod, EntryResourceMissing, BatchCrossReference, DuplicateTarget,
        UnknownSearchParameter, InvalidSearchValue, UnsupportedSearchForm,
        IngestIdMissing, IngestSummary, IngestAborted,
        Unauthenticated, Forbidden,
        Unexpected,
    ];

    /// <summary>Every code the service can answer with: these and the feature catalogues kept beside their endpoints.</summary>
    public static IReadOnlyList<ErrorCode> Published { get; } = [.. All, .. Measures.MeasureErrors.All, .. Analytics.ReportErrorCodes.All, .. Jobs.JobErrors.All];
}
