namespace MeasureEval.Core.Audit;

/// <summary>
/// One audited request: who (token subject, role, payer claim), when, what (route name, FHIR interaction or operation,
/// HTTP method, action C/R/U/D/E), which patients (server ids, at most <see cref="MaxPatientsListed"/> listed;
/// <see cref="PatientCount"/> is the full number) and the HTTP status it was answered with.
/// </summary>
public sealed record AuditRecord
{
    /// <summary>Patient ids kept per event; an export or subject list over more patients keeps the first ones and the count.</summary>
    public const int MaxPatientsListed = 1000;

    public required string Id { get; init; }

    public required DateTimeOffset Recorded { get; init; }

    /// <summary>The token's <c>sub</c>, or <c>anonymous</c> when the request carried no valid token.</summary>
    public required string Agent { get; init; }

    public string? Role { get; init; }

    public string? Payer { get; init; }

    /// <summary>The route name (e.g. <c>read</c>, <c>evaluate-measure-get</c>).</summary>
    public required string Operation { get; init; }

    /// <summary>A http://hl7.org/fhir/restful-interaction code, or the operation name (<c>evaluate-measure</c>).</summary>
    public required string Interaction { get; init; }

    /// <summary>AuditEvent.action: C, R, U, D or E.</summary>
    public required string Action { get; init; }

    public required string Method { get; init; }

    /// <summary>The route template, never the path (a path can carry identifiers).</summary>
    public required string Route { get; init; }

    public required int Status { get; init; }

    public string? Address { get; init; }

    public string? RequestId { get; init; }

    public IReadOnlyList<string> Patients { get; init; } = [];

    public int PatientCount { get; init; }
}

/// <summary>A search of the audit trail, newest first. Null criteria do not restrict.</summary>
public sealed record AuditQuery
{
    /// <summary>Inclusive lower bound of <see cref="AuditRecord.Recorded"/>.</summary>
    public DateTimeOffset? From { get; init; }

    /// <summary>Exclusive upper bound.</summary>
    public DateTimeOffset? Until { get; init; }

    public string? Agent { get; init; }

    public string? PatientId { get; init; }

    public int Count { get; init; } = 50;

    public int Offset { get; init; }
}

public sealed record AuditSearchResult(IReadOnlyList<AuditRecord> Matches, int Total);
