using System.Security.Claims;
using System.Text.Json;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Jobs;

/// <summary>
/// Who started a job, as stored with it: the claims that decide what a caller may see (sub, role, payer). The job runs
/// as <see cref="ToPrincipal"/>, so it has the scope of the caller who started it, not of the worker.
/// </summary>
public sealed record JobCaller(string? Sub, IReadOnlyList<string> Roles, IReadOnlyList<string> Payers)
{
    private const string SubClaim = "sub";

    public static JobCaller Of(ClaimsPrincipal user)
    {
        ArgumentNullException.ThrowIfNull(user);
        return new JobCaller(
            user.FindFirst(SubClaim)?.Value,
            [.. user.FindAll(AccessPolicies.RoleClaim).Select(c => c.Value).Distinct(StringComparer.Ordinal)],
            // Every payer claim, as given: a token CallerScope cannot scope (several payers) stays unscopable, never widened.
            [.. user.FindAll(AccessPolicies.PayerClaim).Select(c => c.Value)]);
    }

    public static JobCaller Parse(string json) => JsonSerializer.Deserialize<JobCaller>(json) ?? throw new JsonException("a job's caller is null");

    public string ToJson() => JsonSerializer.Serialize(this);

    /// <summary>An authenticated principal with the stored claims (same claim types as the bearer scheme: sub, role, payer).</summary>
    public ClaimsPrincipal ToPrincipal()
    {
        var claims = new List<Claim>();
        if (Sub is not null)
        {
            claims.Add(new Claim(SubClaim, Sub));
        }

        claims.AddRange(Roles.Select(r => new Claim(AccessPolicies.RoleClaim, r)));
        claims.AddRange(Payers.Select(p => new Claim(AccessPolicies.PayerClaim, p)));
        return new ClaimsPrincipal(new ClaimsIdentity(claims, "async-job", SubClaim, AccessPolicies.RoleClaim));
    }

    /// <summary>The starter (same sub) or an admin may poll, fetch and cancel a job.</summary>
    public bool MayBeSeenBy(ClaimsPrincipal user)
    {
        ArgumentNullException.ThrowIfNull(user);
        return user.IsInRole(AccessPolicies.AdminRole) || (Sub is not null && user.FindFirst(SubClaim)?.Value == Sub);
    }
}
