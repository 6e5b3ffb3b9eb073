using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Core.Audit;

namespace MeasureEval.Api.Audit;

/// <summary>An audit record as a FHIR R4 AuditEvent (http://hl7.org/fhir/R4/auditevent.html).</summary>
public static class AuditEventMapper
{
    public const string AuditEventTypeSystem = "http://terminology.hl7.org/CodeSystem/audit-event-type";
    public const string RestfulInteractionSystem = "http://hl7.org/fhir/restful-interaction";
    public const string OperationSystem = "https://measureeval.example.org/fhir/CodeSystem/audit-operation";
    public const string RouteSystem = "https://measureeval.example.org/fhir/CodeSystem/route";
    public const string SubjectSystem = "https://measureeval.example.org/fhir/NamingSystem/token-subject";
    public const string RoleSystem = "https://measureeval.example.org/fhir/CodeSystem/role";
    public const string EntityTypeSystem = "http://terminology.hl7.org/CodeSystem/audit-entity-type";
    public const string ObjectRoleSystem = "http://terminology.hl7.org/CodeSystem/object-role";
    public const string SourceTypeSystem = "http://terminology.hl7.org/CodeSystem/security-source-type";

    /// <summary>
    /// AuditEvent.outcome (http://hl7.org/fhir/audit-event-outcome): 0 success, 4 minor failure (the request was refused:
    /// 4xx), 8 serious failure (the service could not answer: 5xx such as 503), 12 major failure (500, an unexpected error).
    /// </summary>
    public static AuditEvent.AuditEventOutcome OutcomeOf(int status) => status switch
    {
        < 400 => AuditEvent.AuditEventOutcome.N0,
        < 500 => AuditEvent.AuditEventOutcome.N4,
        500 => AuditEvent.AuditEventOutcome.N12,
        _ => AuditEvent.AuditEventOutcome.N8,
    };

    public static AuditEvent ToAuditEvent(AuditRecord record)
    {
        ArgumentNullException.ThrowIfNull(record);
        var subtype = IsInteraction(record.Interaction)
            ? new List<Coding> { new(RestfulInteractionSystem, record.Interaction) }
            : [new Coding(RestfulInteractionSystem, "operation"), new Coding(OperationSystem, record.Interaction)];
        subtype.Add(new Coding(RouteSystem, record.Operation));
        var requestor = new AuditEvent.AgentComponent
        {
            Who = new ResourceReference { Identifier = new Identifier(SubjectSystem, record.Agent), Display = record.Agent },
            Requestor = true,
        };
        if (record.Role is { } role)
        {
            requestor.Role = [new CodeableConcept(RoleSystem, role)];
        }

        if (record.Address is { } address)
        {
            requestor.Network = new AuditEvent.NetworkComponent { Address = address, Type = AuditEvent.AuditEventAgentNetworkType.N2 };
        }

        var auditEvent = new AuditEvent
        {
            Id = record.Id,
            Type = new Coding(AuditEventTypeSystem, "rest", "RESTful Operation"),
            Subtype = subtype,
            Action = Enum.Parse<AuditEvent.AuditEventAction>(record.Action),
            Recorded = record.Recorded,
            Outcome = OutcomeOf(record.Status),
            OutcomeDesc = $"HTTP {record.Status.ToString(CultureInfo.InvariantCulture)}",
            Agent = [requestor],
            Source = new AuditEvent.SourceComponent
            {
                Observer = new ResourceReference { Display = "MeasureEval API" },
                Type = [new Coding(SourceTypeSystem, "4", "Application Server")],
            },
        };
        if (record.Payer is { } payer)
        {
            // The Organization the payer token acts for: a second agent, not the requestor.
            auditEvent.Agent.Add(new AuditEvent.AgentComponent { Who = new ResourceReference($"Organization/{payer}"), Requestor = false });
        }

        var request = new AuditEvent.EntityComponent
        {
            Type = new Coding(EntityTypeSystem, "2", "System Object"),
            Name = $"{record.Method} {record.Route}",
            Description = record.Operation,
            Detail =
            [
                Detail("http-method", record.Method),
                Detail("http-status", record.Status.ToString(CultureInfo.InvariantCulture)),
                Detail("patient-count", record.PatientCount.ToString(CultureInfo.InvariantCulture)),
            ],
        };
        if (record.RequestId is { } requestId)
        {
            request.Detail.Add(Detail("request-id", requestId));
        }

        auditEvent.Entity.Add(request);
        foreach (var patient in record.Patients)
        {
            auditEvent.Entity.Add(new AuditEvent.EntityComponent
            {
                What = new ResourceReference($"Patient/{patient}"),
                Type = new Coding(EntityTypeSystem, "1", "Person"),
                Role = new Coding(ObjectRoleSystem, "1", "Patient"),
            });
        }

        return auditEvent;
    }

    private static bool IsInteraction(string code) => code is "read" or "vread" or "update" or "delete" or "history-instance" or "create" or "search-type" or "transaction" or "batch" or "operation";

    private static AuditEvent.DetailComponent Detail(string type, string value) => new() { Type = type, Value = new FhirString(value) };
}
