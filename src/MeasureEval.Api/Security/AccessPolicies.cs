using Microsoft.AspNetCore.Authorization;

namespace MeasureEval.Api.Security;

/// <summary>The roles (claim <c>role</c>) and the policy each endpoint group requires.</summary>
public static class AccessPolicies
{
    public const string RoleClaim = "role";
    public const string PayerClaim = "payer";

    public const string IngestRole = "ingest";
    public const string AnalystRole = "analyst";
    public const string PayerRole = "payer";
    public const string AdminRole = "admin";

    /// <summary>Writes of FHIR data: transactions, $ingest, create/update/delete.</summary>
    public const string Write = "write";

    /// <summary>Reads, searches, evaluations, care gaps, exports and reports over patient data.</summary>
    public const string PatientData = "patient-data";

    /// <summary>Measure and library definitions (no patient data): every role may read them.</summary>
    public const string Definitions = "definitions";

    /// <summary>Loading measures and value sets, reading the audit trail.</summary>
    public const string Manage = "manage";

    public static void Add(AuthorizationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        options.FallbackPolicy = new AuthorizationPolicyBuilder().RequireAuthenticatedUser().Build();
        options.AddPolicy(Write, p => p.RequireRole(IngestRole, AdminRole));
        // A payer is admitted only with a usable payer claim: the store then answers within its members (CallerScope).
        options.AddPolicy(PatientData, p => p.RequireRole(AnalystRole, PayerRole, AdminRole).RequireAssertion(c => CallerScope.TryOf(c.User, out _)));
        options.AddPolicy(Definitions, p => p.RequireRole(IngestRole, AnalystRole, PayerRole, AdminRole));
        options.AddPolicy(Manage, p => p.RequireRole(AdminRole));
    }
}
