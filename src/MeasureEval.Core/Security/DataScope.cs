namespace MeasureEval.Core.Security;

/// <summary>
/// Which patients a caller may see. Unrestricted for analysts and admins; a payer sees only its members (a Coverage whose
/// payor is its Organization, or a Group it manages). Passed explicitly down to the store so no path can forget it,
/// and stored with an asynchronous job so the job runs with the scope of the caller who started it.
/// </summary>
public sealed record DataScope
{
    private DataScope(string? payerOrganizationId) => PayerOrganizationId = payerOrganizationId;

    public static DataScope Unrestricted { get; } = new((string?)null);

    /// <summary>The payer's Organization id (a plain id, not a reference), or null when unrestricted.</summary>
    public string? PayerOrganizationId { get; }

    public bool IsUnrestricted => PayerOrganizationId is null;

    public static DataScope ForPayer(string organizationId)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(organizationId);
        return new DataScope(organizationId);
    }
}
