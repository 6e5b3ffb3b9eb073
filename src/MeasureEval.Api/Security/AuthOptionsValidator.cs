using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Security;

/// <summary>Collects every problem with the <c>Auth</c> section, so the service refuses to start without usable auth.</summary>
public sealed class AuthOptionsValidator : IValidateOptions<AuthOptions>
{
    public ValidateOptionsResult Validate(string? name, AuthOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (options.Disabled)
        {
            return ValidateOptionsResult.Success;
        }

        var failures = new List<string>();
        if (string.IsNullOrWhiteSpace(options.Issuer))
        {
            failures.Add("Auth:Issuer is required (or Auth:Disabled=true on a loopback-only address).");
        }

        if (string.IsNullOrWhiteSpace(options.Audience))
        {
            failures.Add("Auth:Audience is required.");
        }

        var hasKey = !string.IsNullOrWhiteSpace(options.SigningKey);
        var hasAuthority = !string.IsNullOrWhiteSpace(options.Authority);
        if (hasKey == hasAuthority)
        {
            failures.Add("Exactly one of Auth:SigningKey (base64, HS256) and Auth:Authority (OpenID Connect, RS256) must be set.");
        }
        else if (hasKey && KeyLength(options.SigningKey!) is null)
        {
            failures.Add("Auth:SigningKey is not base64.");
        }
        else if (hasKey && KeyLength(options.SigningKey!) < 32)
        {
            // RFC 7518 §3.2: an HS256 key must be at least 256 bits.
            failures.Add("Auth:SigningKey must decode to at least 32 bytes.");
        }

        return failures.Count == 0 ? ValidateOptionsResult.Success : ValidateOptionsResult.Fail(failures);
    }

    private static int? KeyLength(string key) =>
        Convert.TryFromBase64String(key, new byte[key.Length], out var length) ? length : null;
}
