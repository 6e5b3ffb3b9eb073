using System.Data.Common;
using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;

namespace MeasureEval.Storage.Common;

/// <summary>
/// Applies a <see cref="DataScope"/> to what the store returns. One rule, written twice: as SQL for searches and index
/// streams (so paging and totals only ever count what the caller may see) and in C# for single reads, versions and history
/// (where each version is judged by its own body). A payer sees: a Coverage whose payor it is and a Group it manages;
/// any resource in the compartment of one of its members; resources of the shared (directory and definition) types
/// outside every compartment; nothing else.
/// </summary>
internal sealed class ScopeCheck(DbConnection connection, DataScope scope)
{
    private readonly Dictionary<string, bool> _members = new(StringComparer.Ordinal);

    /// <summary>True when the version (for a deletion: the body it deleted) is in the scope.</summary>
    public async System.Threading.Tasks.Task<bool> VisibleAsync(StoredResource version, CancellationToken cancellationToken)
    {
        if (scope.IsUnrestricted)
        {
            return true;
        }

        var json = version.Json;
        if (json is null)
        {
            await using var command = SqlResourceStore.Command(connection, null, StoreSql.LastBodyAtOrBefore, version.ResourceType, version.Id, version.VersionId - 1);
            json = await command.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false) as string;
        }

        return json is not null && await VisibleAsync(json, cancellationToken).ConfigureAwait(false);
    }

    public async System.Threading.Tasks.Task<bool> VisibleAsync(string json, CancellationToken cancellationToken)
    {
        if (scope.IsUnrestricted)
        {
            return true;
        }

        var resource = FhirJson.Parse<Resource>(json);
        if (PayerLinks.IsOwnedType(resource.TypeName))
        {
            return PayerLinks.OwnersOf(resource).Contains(scope.PayerOrganizationId!, StringComparer.Ordinal);
        }

        return ResourceKeys.CompartmentPatientOf(resource) is { } patientId
            ? await IsMemberAsync(patientId, cancellationToken).ConfigureAwait(false)
            : PayerLinks.SharedTypes.Contains(resource.TypeName);
    }

    /// <summary>True when the patient is the payer's member (overlapping the scope's period when it has one).</summary>
    public async System.Threading.Tasks.Task<bool> IsMemberAsync(string patientId, CancellationToken cancellationToken)
    {
        if (scope.IsUnrestricted)
        {
            return true;
        }

        if (_members.TryGetValue(patientId, out var known))
        {
            return known;
        }

        await using var command = scope.PeriodStart is { } start && scope.PeriodEnd is { } end
            ? SqlResourceStore.Command(connection, null, StoreSql.IsMemberDuring, scope.PayerOrganizationId, patientId, Day(start), Day(end))
            : SqlResourceStore.Command(connection, null, StoreSql.IsMember, scope.PayerOrganizationId, patientId);
        var member = await command.ExecuteScalarAsync(cancellationToken).ConfigureAwait(false) is not (null or DBNull);
        _members[patientId] = member;
        return member;
    }

    /// <summary>
    /// " AND …" restricting patient ids in <paramref name="patientColumn"/> to the payer's members; parameters are appended
    /// to <paramref name="values"/> (positional @pN). Empty when unrestricted.
    /// </summary>
    public static string MemberFilter(DataScope scope, string patientColumn, List<object?> values)
    {
        ArgumentNullException.ThrowIfNull(scope);
        return scope.IsUnrestricted ? string.Empty : " AND " + MemberExists(scope, patientColumn, values);
    }

    /// <summary>" AND …" restricting current resources (alias r) of the type to those in the scope. Empty when unrestricted.</summary>
    public static string ResourceFilter(DataScope scope, string resourceType, List<object?> values)
    {
        ArgumentNullException.ThrowIfNull(scope);
        if (scope.IsUnrestricted)
        {
            return string.Empty;
        }

        if (PayerLinks.IsOwnedType(resourceType))
        {
            return $" AND EXISTS (SELECT 1 FROM payer_resources o WHERE o.type = r.type AND o.id = r.id AND o.payer_id = {Next(values, scope.PayerOrganizationId)})";
        }

        var member = MemberExists(scope, "r.patient_id", values);
        return PayerLinks.SharedTypes.Contains(resourceType)
            ? $" AND (r.patient_id IS NULL OR {member})"
            : $" AND r.patient_id IS NOT NULL AND {member}";
    }

    /// <summary>A payer sees its own Coverages only (and, in them, only its own payor references), so no other payer shows in a stratum or an export.</summary>
    public static PatientFacts Narrow(PatientFacts facts, DataScope scope)
    {
        if (scope.IsUnrestricted)
        {
            return facts;
        }

        var payer = scope.PayerOrganizationId;
        var own = new List<CoverageFact>(facts.Coverages.Count);
        foreach (var coverage in facts.Coverages)
        {
            var payors = coverage.Payors.Where(p => PayerLinks.OrganizationIdOf(new ResourceReference(p)) == payer).ToList();
            if (payors.Count > 0)
            {
                own.Add(payors.Count == coverage.Payors.Count ? coverage : coverage with { Payors = payors });
            }
        }

        return own.Count == facts.Coverages.Count ? facts : facts with { Coverages = own };
    }

    private static string MemberExists(DataScope scope, string patientColumn, List<object?> values)
    {
        // IN rather than a correlated EXISTS, so the planner may drive from the payer's (few) members instead of probing
        // every row of a large population.
        var sql = $"{patientColumn} IN (SELECT m.patient_id FROM payer_members m WHERE m.payer_id = {Next(values, scope.PayerOrganizationId)}";
        if (scope.PeriodStart is { } start && scope.PeriodEnd is { } end)
        {
            sql += $" AND (m.period_start IS NULL OR m.period_start <= {Next(values, Day(end))}) AND (m.period_end IS NULL OR m.period_end >= {Next(values, Day(start))})";
        }

        return sql + ")";
    }

    private static string Next(List<object?> values, object? value)
    {
        values.Add(value);
        return "@p" + (values.Count - 1).ToString(CultureInfo.InvariantCulture);
    }

    private static string Day(DateOnly day) => day.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
}
