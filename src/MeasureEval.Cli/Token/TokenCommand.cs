using System.CommandLine;
using MeasureEval.Core.Security;

namespace MeasureEval.Cli.Token;

/// <summary>
/// <c>measureeval token</c>: prints a development bearer token for a role (and payer) signed with the configured HS256 key.
/// The key, issuer and audience default to the service's environment variables (<c>Auth__SigningKey</c> …), so the same
/// environment that starts the service mints tokens for it. Exit codes: 0 printed, 2 no key.
/// </summary>
internal static class TokenCommand
{
    private static readonly string[] Roles = ["ingest", "analyst", "payer", "admin"];

    public static Command Create(TimeProvider time)
    {
        var role = new Option<string>("--role") { Description = "ingest, analyst, payer or admin.", Required = true };
        role.AcceptOnlyFromAmong(Roles);
        var payer = new Option<string>("--payer") { Description = "Organization id of the payer (required with --role payer)." };
        var key = new Option<string>("--key") { Description = "Base64 HS256 key (default: $Auth__SigningKey)." };
        var issuer = new Option<string>("--issuer") { Description = "Issuer (default: $Auth__Issuer)." };
        var audience = new Option<string>("--audience") { Description = "Audience (default: $Auth__Audience)." };
        var subject = new Option<string>("--subject") { Description = "Subject (sub claim): who the token names.", DefaultValueFactory = _ => Environment.UserName };
        var hours = new Option<int>("--hours") { Description = "Lifetime in hours.", DefaultValueFactory = _ => 8 };
        var command = new Command("token", "Print a development bearer token for the service.") { role, payer, key, issuer, audience, subject, hours };
        command.Validators.Add(r =>
        {
            if (r.GetValue(role) == "payer" && string.IsNullOrWhiteSpace(r.GetValue(payer)))
            {
                r.AddError("--role payer needs --payer <Organization id>");
            }
        });
        command.SetAction(parse =>
        {
            var signingKey = parse.GetValue(key) ?? Environment.GetEnvironmentVariable("Auth__SigningKey");
            if (string.IsNullOrWhiteSpace(signingKey))
            {
                Console.Error.WriteLine("no signing key: pass --key or set Auth__SigningKey");
                return 2;
            }

            var request = new TokenRequest(
                signingKey,
                parse.GetValue(issuer) ?? Environment.GetEnvironmentVariable("Auth__Issuer") ?? "measureeval-dev",
                parse.GetValue(audience) ?? Environment.GetEnvironmentVariable("Auth__Audience") ?? "measureeval",
                parse.GetValue(subject)!,
                parse.GetValue(role)!,
                parse.GetValue(role) == "payer" ? parse.GetValue(payer) : null,
                TimeSpan.FromHours(parse.GetValue(hours)));
            Console.WriteLine(DevelopmentTokens.Mint(request, time));
            return 0;
        });
        return command;
    }
}
