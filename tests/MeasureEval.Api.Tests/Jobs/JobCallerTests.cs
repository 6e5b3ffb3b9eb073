using System.Security.Claims;
using MeasureEval.Api.Jobs;

namespace MeasureEval.Api.Tests.Jobs;

public sealed class JobCallerTests
{
    [Fact]
    public void Parse_StoredCaller_RebuildsPrincipalWithSameClaims()
    {
        var user = Principal("payer-7", "payer", "cedar-valley");

        var principal = JobCaller.Parse(JobCaller.Of(user).ToJson()).ToPrincipal();

        Assert.True(principal.Identity!.IsAuthenticated);
        Assert.Equal("payer-7", principal.FindFirst("sub")!.Value);
        Assert.True(principal.IsInRole("payer"));
        Assert.Equal("cedar-valley", principal.FindFirst("payer")!.Value);
    }

    [Fact]
    public void MayBeSeenBy_StarterAdminOther()
    {
        var caller = JobCaller.Of(Principal("analyst-a", "analyst", null));

        Assert.True(caller.MayBeSeenBy(Principal("analyst-a", "analyst", null)));
        Assert.True(caller.MayBeSeenBy(Principal("someone", "admin", null)));
        Assert.False(caller.MayBeSeenBy(Principal("analyst-b", "analyst", null)));
        Assert.False(JobCaller.Of(Principal(null, "analyst", null)).MayBeSeenBy(Principal(null, "analyst", null)));
    }

    private static ClaimsPrincipal Principal(string? sub, string role, string? payer)
    {
        var claims = new List<Claim> { new("role", role) };
        if (sub is not null)
        {
            claims.Add(new Claim("sub", sub));
        }

        if (payer is not null)
        {
            claims.Add(new Claim("payer", payer));
        }

        return new ClaimsPrincipal(new ClaimsIdentity(claims, "test", "sub", "role"));
    }
}
