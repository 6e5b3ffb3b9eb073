using System.Globalization;
using System.Text.RegularExpressions;
using Hl7.Fhir.Model;
using Group = Hl7.Fhir.Model.Group;
using MeasureEval.Core.Index;

namespace MeasureEval.Storage.Common;

/// <summary>A payer's member, as one Coverage or Group version states it. Dates are "yyyy-MM-dd", null for an open end.</summary>
internal sealed record PayerMembership(string PayerId, string PatientId, string? PeriodStart, string? PeriodEnd);

/// <summary>
/// What ties a resource to a payer, derived from the current version at write time: the Organizations that own it
/// (Coverage.payor of any status, Group.managingEntity) and the memberships it grants (an active Coverage's beneficiary
/// for its Coverage.period; a managed Group's members that are not inactive, for their member.period).
/// </summary>
internal static partial class PayerLinks
{
    /// <summary>Types whose visibility to a payer is decided by ownership, not by a patient compartment.</summary>
    public static bool IsOwnedType(string resourceType) => resourceType is "Coverage" or "Group";

    /// <summary>
    /// Types outside every patient compartment that a payer may read: directories and definitions. Deny by default: a type
    /// not listed here is visible to a payer only through a member's compartment (subject/patient/beneficiary).
    /// </summary>
    public static readonly IReadOnlySet<string> SharedTypes = new HashSet<string>(StringComparer.Ordinal)
    {
        "Organization", "Practitioner", "PractitionerRole", "Location", "HealthcareService", "Endpoint",
        "Measure", "Library", "ValueSet", "CodeSystem", "ConceptMap", "StructureDefinition", "SearchParameter",
        "OperationDefinition", "CapabilityStatement", "Medication", "Substance", "ActivityDefinition", "PlanDefinition",
        "Questionnaire",
    };

    public static IReadOnlyCollection<string> OwnersOf(Resource resource) => resource switch
    {
        Coverage coverage => [.. coverage.Payor.Select(OrganizationIdOf).OfType<string>().Distinct(StringComparer.Ordinal)],
        Group group when OrganizationIdOf(group.ManagingEntity) is { } owner => [owner],
        _ => [],
    };

    public static IReadOnlyList<PayerMembership> MembershipsOf(Resource resource)
    {
        var memberships = new List<PayerMembership>();
        switch (resource)
        {
            // Only an active Coverage makes a member; cancelled, draft and entered-in-error ones do not (R4 FinancialResourceStatusCodes).
            case Coverage { Status: FinancialResourceStatusCodes.Active } coverage
                when FactExtractor.PatientIdOf(coverage.Beneficiary) is { } patientId:
                foreach (var payer in OwnersOf(coverage))
                {
                    memberships.Add(new PayerMembership(payer, patientId, FirstDay(coverage.Period?.Start), LastDay(coverage.Period?.End)));
                }

                break;

            // A Group marked inactive (Group.active = false) is not in use: it attributes nobody.
            case Group group when group.Active != false && OrganizationIdOf(group.ManagingEntity) is { } owner:
                foreach (var member in group.Member)
                {
                    if (member.Inactive != true && FactExtractor.PatientIdOf(member.Entity) is { } patientId)
                    {
                        memberships.Add(new PayerMembership(owner, patientId, FirstDay(member.Period?.Start), LastDay(member.Period?.End)));
                    }
                }

                break;
        }

        return memberships;
    }

    /// <summary>The Organization id a reference points at ("Organization/x", an absolute URL ending so, or null).</summary>
    public static string? OrganizationIdOf(ResourceReference? reference) =>
        FactExtractor.IdOf(reference, "Organization") is { } id && ResourceKeys.IsValidId(id) ? id : null;

    /// <summary>The first day a stated FHIR date/dateTime can mean ("2026" → 2026-01-01); the time of day is not used.</summary>
    internal static string? FirstDay(string? stated) =>
        Parse(stated) is var (year, month, day) ? new DateOnly(year, month ?? 1, day ?? 1).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture) : null;

    /// <summary>The last day a stated FHIR date/dateTime can mean ("2026-02" → 2026-02-28).</summary>
    internal static string? LastDay(string? stated)
    {
        if (Parse(stated) is not var (year, month, day))
        {
            return null;
        }

        var m = month ?? 12;
        return new DateOnly(year, m, day ?? DateTime.DaysInMonth(year, m)).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
    }

    private static (int Year, int? Month, int? Day)? Parse(string? stated)
    {
        // The strict parser has already checked the FHIR date/dateTime grammar; a value that still fails is left open.
        var match = stated is null ? null : StatedDate().Match(stated);
        if (match is not { Success: true })
        {
            return null;
        }

        var year = int.Parse(match.Groups[1].Value, CultureInfo.InvariantCulture);
        int? month = match.Groups[2].Success ? int.Parse(match.Groups[2].Value, CultureInfo.InvariantCulture) : null;
        int? day = match.Groups[3].Success ? int.Parse(match.Groups[3].Value, CultureInfo.InvariantCulture) : null;
        return year >= 1 && month is null or (>= 1 and <= 12) && (day is null || (month is { } mm && day >= 1 && day <= DateTime.DaysInMonth(year, mm)))
            ? (year, month, day)
            : null;
    }

    [GeneratedRegex(@"^(\d{4})(?:-(\d{2})(?:-(\d{2}))?)?", RegexOptions.CultureInvariant)]
    private static partial Regex StatedDate();
}
