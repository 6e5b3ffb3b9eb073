namespace MeasureEval.Api.Audit;

/// <summary>What an audited route does, in AuditEvent terms.</summary>
/// <param name="Interaction">A code of http://hl7.org/fhir/restful-interaction.</param>
/// <param name="Operation">The operation's name (<c>evaluate-measure</c>) for operations and reports, else null.</param>
/// <param name="Action">AuditEvent.action (http://hl7.org/fhir/audit-event-action): C, R, U, D, E.</param>
/// <param name="PatientRead">True when the answer can carry patient-level data: such a read is refused when it cannot be audited.</param>
public sealed record AuditedRoute(string Interaction, string? Operation, string Action, bool PatientRead);

/// <summary>
/// Every audited route by its name. A route that reads patient data or writes anything must be listed here
/// (<c>AuditRoutesTests</c> fails for one that is not): nothing escapes the trail by being new.
/// </summary>
public static class AuditRoutes
{
    private static readonly Dictionary<string, AuditedRoute> Routes = new(StringComparer.Ordinal)
    {
        ["transaction"] = new("transaction", null, "E", false),
        ["ingest"] = new("operation", "ingest", "C", false),
        ["create"] = new("create", null, "C", false),
        ["update"] = new("update", null, "U", false),
        ["delete"] = new("delete", null, "D", false),
        ["measure-put"] = new("update", null, "U", false),
        ["valueset-put"] = new("update", null, "U", false),
        ["read"] = new("read", null, "R", true),
        ["vread"] = new("vread", null, "R", true),
        ["history-instance"] = new("history-instance", null, "R", true),
        ["search-type"] = new("search-type", null, "R", true),
        ["search-type-post"] = new("search-type", null, "R", true),
        ["evaluate-measure-get"] = new("operation", "evaluate-measure", "E", true),
        ["evaluate-measure-post"] = new("operation", "evaluate-measure", "E", true),
        ["evaluate-measures"] = new("operation", "evaluate-measure", "E", true),
        ["care-gaps-get"] = new("operation", "care-gaps", "E", true),
        ["care-gaps-post"] = new("operation", "care-gaps", "E", true),
        ["care-gaps-export"] = new("operation", "care-gaps-export", "E", true),
        ["GetReportIndex"] = new("operation", "report-index", "R", true),
        ["GetMeasureReport"] = new("operation", "measure-report", "R", true),
        // Polling a job returns the finished operation's answer (stored bytes: the patients it names are not listed).
        ["job-status"] = new("operation", "job-status", "R", true),
        ["job-cancel"] = new("operation", "job-cancel", "D", false),
        [AuditEventEndpoints.SearchName] = new("search-type", null, "R", true),
        [AuditEventEndpoints.ReadName] = new("read", null, "R", true),
    };

    public static IReadOnlyCollection<string> Names => Routes.Keys;

    public static bool TryGet(string? routeName, out AuditedRoute route)
    {
        route = null!;
        return routeName is not null && Routes.TryGetValue(routeName, out route!);
    }
}
