using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Security;

/// <summary>
/// Headers on every answer: no MIME sniffing, no framing (the report page's inline SVG and CSS need no CSP allowance
/// beyond frame-ancestors, which is the only directive sent), no referrer leaking query strings with patient ids.
/// </summary>
public sealed class SecurityHeadersMiddleware(RequestDelegate next)
{
    public Task InvokeAsync(HttpContext context)
    {
        ArgumentNullException.ThrowIfNull(context);
        context.Response.OnStarting(() =>
        {
            var headers = context.Response.Headers;
            headers.XContentTypeOptions = "nosniff";
            headers.XFrameOptions = "DENY";
            headers.ContentSecurityPolicy = "frame-ancestors 'none'";
            headers["Referrer-Policy"] = "no-referrer";
            return Task.CompletedTask;
        });
        return next(context);
    }
}
