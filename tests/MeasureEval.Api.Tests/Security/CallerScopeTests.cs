using System.Security.Claims;
using MeasureEval.Api.Security;
using MeasureEval.Core.Security;

namespace MeasureEval.Api.Tests.Security;

public sealed class CallerScopeTests
{
    [Theory]
    [InlineData("analyst")]
    [InlineData("admin")]
    public void TryOf_AnalystOrAdmin_IsUnrestricted(string role)
    {
        Assert.True(CallerScope.TryOf(User((AccessPolicies.RoleClaim, role)), out var scope));
        Assert.Same(DataScope.Unrestricted, scope);
    }

    [Fact]
    public void TryOf_PayerWithClaim_IsScopedToThatOrganization()
    {
        Assert.True(CallerScope.TryOf(User((AccessPolicies.RoleClaim, "payer"), (AccessPolicies.PayerClaim, "cedar-valley")), out var scope));
        Assert.Equal("cedar-valley", scope.PayerOrganizationId);
        Assert.Equal(DataScope.ForPayer("cedar-valley"), CallerScope.Of(User((AccessPolicies.RoleClaim, "payer"), (AccessPolicies.PayerClaim, "cedar-valley"))));
    }

    [Fact]
    public void TryOf_PayerAlsoAdmin_StaysScoped()
    {
        var user = User((AccessPolicies.RoleClaim, "admin"), (AccessPolicies.RoleClaim, "payer"), (AccessPolicies.PayerClaim, "cedar-valley"));

        Assert.True(CallerScope.TryOf(user, out var scope));
        Assert.Equal("cedar-valley", scope.PayerOrganizationId);
    }

    [Theory]
    [InlineData(null)]
    [InlineData("")]
    [InlineData("Organization/cedar-valley")] // a reference, not an id (FHIR R4 id: [A-Za-z0-9\-\.]{1,64})
    [InlineData("cedar valley")]
    public void TryOf_PayerWithoutUsableClaim_IsRefused(string? payer)
    {
        var user = payer is null ? User((AccessPolicies.RoleClaim, "payer")) : User((AccessPolicies.RoleClaim, "payer"), (AccessPolicies.PayerClaim, payer));

        Assert.False(CallerScope.TryOf(user, out _));
        Assert.Throws<InvalidOperationException>(() => CallerScope.Of(user));
    }

    [Fact]
    public void TryOf_TwoPayerClaims_IsRefused()
    {
        Assert.False(CallerScope.TryOf(User((AccessPolicies.RoleClaim, "payer"), (AccessPolicies.PayerClaim, "a"), (AccessPolicies.PayerClaim, "b")), out _));
    }

    [Theory]
    [InlineData("ingest")]
    [InlineData("someone")]
    public void TryOf_RoleWithoutPatientData_IsRefused(string role)
    {
        Assert.False(CallerScope.TryOf(User((AccessPolicies.RoleClaim, role)), out _));
        Assert.False(CallerScope.TryOf(new ClaimsPrincipal(new ClaimsIdentity()), out _));
    }

    private static ClaimsPrincipal User(params (string Type, string Value)[] claims) =>
        new(new ClaimsIdentity(claims.Select(c => new Claim(c.Type, c.Value)), "test", "sub", AccessPolicies.RoleClaim));
}
