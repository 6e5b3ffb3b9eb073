using System.Net.Http.Headers;
using MeasureEval.Core.Security;

namespace MeasureEval.Testing;

/// <summary>A key generated per test run (never committed) and tokens for any role signed with it.</summary>
public static class TestTokens
{
    public const string Issuer = "https://auth.test.measureeval.example.org";
    public const string Audience = "measureeval-tests";

    public static string SigningKey { get; } = DevelopmentTokens.NewSigningKey();

    /// <summary>Host settings that make the service accept these tokens.</summary>
    public static IReadOnlyDictionary<string, string> Settings { get; } = new Dictionary<string, string>
    {
        ["Auth:Issuer"] = Issuer,
        ["Auth:Audience"] = Audience,
        ["Auth:SigningKey"] = SigningKey,
    };

    public static string Mint(string role, string? payer = null, string? subject = null) =>
        DevelopmentTokens.Mint(new TokenRequest(SigningKey, Issuer, Audience, subject ?? $"test-{role}", role, payer, TimeSpan.FromHours(1)), TimeProvider.System);

    public static AuthenticationHeaderValue Header(string role, string? payer = null) => new("Bearer", Mint(role, payer));
}
