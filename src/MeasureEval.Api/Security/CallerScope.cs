using System.Diagnostics.CodeAnalysis;
using System.Security.Claims;
using System.Text.RegularExpressions;
using MeasureEval.Core.Security;

namespace MeasureEval.Api.Security;

/// <summary>
/// The <see cref="DataScope"/> of an authenticated caller: analysts and admins see everything, a payer token sees the
/// members of the Organization its <c>payer</c> claim names. A token that carries the payer role is scoped even when it
/// carries another role too (the narrower reading wins). Also used by work that runs later on a caller's behalf.
/// </summary>
public static partial class CallerScope
{
    /// <summary>The caller's scope; throws for a caller the <see cref="AccessPolicies.PatientData"/> policy refuses.</summary>
    public static DataScope Of(ClaimsPrincipal user) =>
        TryOf(user, out var scope)
            ? scope
            : throw new InvalidOperationException("The caller has no data scope: the patient-data policy should have refused it.");

    /// <summary>
    /// False for a caller without a patient-data role, and for a payer token whose <c>payer</c> claim is missing, repeated or
    /// not a FHIR id (such a token cannot be scoped, so it is refused rather than widened).
    /// </summary>
    public static bool TryOf(ClaimsPrincipal user, [NotNullWhen(true)] out DataScope? scope)
    {
        ArgumentNullException.ThrowIfNull(user);
        scope = null;
        if (user.Identity?.IsAuthenticated != true)
        {
            return false;
        }

        var roles = user.FindAll(AccessPolicies.RoleClaim).Select(c => c.Value).ToHashSet(StringComparer.Ordinal);
        if (roles.Contains(AccessPolicies.PayerRole))
        {
            var payers = user.FindAll(AccessPolicies.PayerClaim).Select(c => c.Value).Distinct(StringComparer.Ordinal).ToList();
            if (payers is not [var payer] || !FhirId().IsMatch(payer))
            {
                return false;
            }

            scope = DataScope.ForPayer(payer);
            return true;
        }

        if (roles.Contains(AccessPolicies.AnalystRole) || roles.Contains(AccessPolicies.AdminRole))
        {
            scope = DataScope.Unrestricted;
            return true;
        }

        return false;
    }

    // FHIR R4 datatypes, "id": [A-Za-z0-9\-\.]{1,64}.
    [GeneratedRegex(@"^[A-Za-z0-9\-\.]{1,64}$", RegexOptions.CultureInvariant)]
    private static partial Regex FhirId();
}
