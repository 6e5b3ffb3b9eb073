using System.Security.Cryptography;
using System.Text;
using System.Text.Json;

namespace MeasureEval.Core.Security;

/// <summary>
/// Mints HS256 bearer tokens (RFC 7519) against a shared key, for local use and tests; production tokens come from
/// the organisation's identity provider. Hand-written because HS256 is a few lines and Core stays free of web packages.
/// </summary>
public static class DevelopmentTokens
{
    /// <summary>A fresh random key, base64, 256 bits (the HS256 minimum, RFC 7518 §3.2).</summary>
    public static string NewSigningKey() => Convert.ToBase64String(RandomNumberGenerator.GetBytes(32));

    /// <summary>A signed token for <paramref name="role"/> (and the payer's Organization id for role <c>payer</c>).</summary>
    public static string Mint(TokenRequest request, TimeProvider time)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(time);
        var now = time.GetUtcNow();
        var claims = new Dictionary<string, object>
        {
            ["iss"] = request.Issuer,
            ["aud"] = request.Audience,
            ["sub"] = request.Subject,
            ["role"] = request.Role,
            ["iat"] = now.ToUnixTimeSeconds(),
            ["nbf"] = now.ToUnixTimeSeconds(),
            ["exp"] = now.Add(request.Lifetime).ToUnixTimeSeconds(),
        };
        if (request.Payer is not null)
        {
            claims["payer"] = request.Payer;
        }

        var header = Base64Url("""{"alg":"HS256","typ":"JWT"}"""u8);
        var payload = Base64Url(JsonSerializer.SerializeToUtf8Bytes(claims));
        var signingInput = Encoding.ASCII.GetBytes($"{header}.{payload}");
        var signature = HMACSHA256.HashData(Convert.FromBase64String(request.SigningKey), signingInput);
        return $"{header}.{payload}.{Base64Url(signature)}";
    }

    private static string Base64Url(ReadOnlySpan<byte> bytes) =>
        Convert.ToBase64String(bytes).TrimEnd('=').Replace('+', '-').Replace('/', '_');
}

/// <summary>What a development token says: issuer, audience, subject, role, payer and lifetime, signed with <see cref="SigningKey"/>.</summary>
public sealed record TokenRequest(string SigningKey, string Issuer, string Audience, string Subject, string Role, string? Payer, TimeSpan Lifetime);
