using System.Text.RegularExpressions;
using Microsoft.AspNetCore.Http;
using Serilog.Context;

namespace MeasureEval.Api.Logging;

/// <summary>
/// Correlation id: taken from <c>X-Request-Id</c> when it is a plain token, otherwise generated; echoed in the
/// response and attached to every log event of the request.
/// </summary>
public sealed partial class RequestIdMiddleware(RequestDelegate next)
{
    public const string Header = "X-Request-Id";

    public async Task InvokeAsync(HttpContext context)
    {
        ArgumentNullException.ThrowIfNull(context);
        var offered = context.Request.Headers[Header].ToString();
        // Only a short token is echoed: a header is client input and must not inject text into logs.
        var id = SafeId().IsMatch(offered) ? offered : Guid.NewGuid().ToString("N");
        context.TraceIdentifier = id;
        context.Response.OnStarting(() =>
        {
            context.Response.Headers[Header] = id;
            return Task.CompletedTask;
        });
        using (LogContext.PushProperty("RequestId", id))
        {
            await next(context);
        }
    }

    [GeneratedRegex("^[A-Za-z0-9._:-]{1,128}$")]
    private static partial Regex SafeId();
}
