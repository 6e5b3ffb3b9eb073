namespace MeasureEval.Api.Security;

/// <summary>Bearer-token validation (configuration section <c>Auth</c>); checked at start by <see cref="AuthOptionsValidator"/>.</summary>
public sealed class AuthOptions
{
    public const string Section = "Auth";

    /// <summary>Switches authentication off; only accepted when every server address is loopback (<see cref="LoopbackGuard"/>).</summary>
    public bool Disabled { get; set; }

    public string? Issuer { get; set; }

    public string? Audience { get; set; }

    /// <summary>Base64 HS256 key (single site, tests); never committed, comes from the environment.</summary>
    public string? SigningKey { get; set; }

    /// <summary>OpenID Connect issuer whose discovery document and JWKS give the RS256 keys.</summary>
    public string? Authority { get; set; }
}
