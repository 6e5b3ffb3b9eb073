namespace MeasureEval.Core.Security;

/// <summary>
/// Which patients a caller may see. Unrestricted for analysts and admins; a payer sees only its members (a Coverage whose
/// payor is its Organization, or a Group it manages). Passed explicitly down to the store so no path can forget it,
/// and stored with an asynchronous job so the job runs with the scope of the caller who started it.
/// </summary>
/// <remarks>
/// A scope without a period (reads, searches, history) admits a payer's member of any period; <see cref="During"/> narrows
/// it to memberships that overlap a measurement period (evaluations, gap reports, analytics).
/// </remarks>
public sealed record DataScope
{
    private DataScope(string? payerOrganizationId, DateOnly? periodStart = null, DateOnly? periodEnd = null)
    {
        PayerOrganizationId = payerOrganizationId;
        PeriodStart = periodStart;
        PeriodEnd = periodEnd;
    }

    public static DataScope Unrestricted { get; } = new((string?)null);

    /// <summary>The payer's Organization id (a plain id, not a reference), or null when unrestricted.</summary>
    public string? PayerOrganizationId { get; }

    /// <summary>First day of the period memberships must overlap; null when any membership counts.</summary>
    public DateOnly? PeriodStart { get; }

    /// <summary>Last day of that period (inclusive).</summary>
    public DateOnly? PeriodEnd { get; }

    public bool IsUnrestricted => PayerOrganizationId is null;

    public static DataScope ForPayer(string organizationId)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(organizationId);
        return new DataScope(organizationId);
    }

    /// <summary>The same caller, admitting only memberships that overlap [start, end]. Unrestricted stays unrestricted.</summary>
    public DataScope During(DateOnly start, DateOnly end)
    {
        if (end < start)
        {
            throw new ArgumentOutOfRangeException(nameof(end), "The period ends before it starts.");
        }

        return IsUnrestricted ? this : new DataScope(PayerOrganizationId, start, end);
    }
}
