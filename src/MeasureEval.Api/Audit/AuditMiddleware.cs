using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;

namespace MeasureEval.Api.Audit;

/// <summary>
/// Runs after authentication and before authorization on audited routes: attaches the <see cref="AuditTrail"/>, and
/// records what never reached the endpoint filter (401, 403, unexpected errors) and the end of streamed answers.
/// </summary>
public sealed class AuditMiddleware(RequestDelegate next)
{
    /// <summary>Status recorded when the client went away before the answer was complete (common practice, nginx).</summary>
    public const int ClientClosedRequest = 499;

    public async Task InvokeAsync(HttpContext context, AuditRecorder recorder)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(recorder);
        var name = context.GetEndpoint()?.Metadata.GetMetadata<IEndpointNameMetadata>()?.EndpointName;
        if (!AuditRoutes.TryGet(name, out var route))
        {
            await next(context);
            return;
        }

        var trail = new AuditTrail();
        context.Features.Set(trail);
        try
        {
            await next(context);
        }
        catch (Exception)
        {
            await FinishAsync(context, recorder, name!, route, trail, context.RequestAborted.IsCancellationRequested ? ClientClosedRequest : StatusCodes.Status500InternalServerError);
            throw;
        }

        await FinishAsync(context, recorder, name!, route, trail, context.Response.StatusCode);
    }

    private static async Task FinishAsync(HttpContext context, AuditRecorder recorder, string name, AuditedRoute route, AuditTrail trail, int status)
    {
        status = trail.FinalStatus ?? status;
        if (trail.EventId is null && status == StatusCodes.Status429TooManyRequests)
        {
            // Refused by the rate limiter before authorization: nothing was read or written, and recording each refusal
            // would hand a flooding client the store's write path the limiter exists to protect.
            return;
        }

        if (trail.EventId is null)
        {
            await recorder.TryAppendAsync(recorder.Build(context, name, route, status, trail));
        }
        else if (trail.Streamed && trail.EventId.Length > 0)
        {
            await recorder.TryCompleteAsync(trail.EventId, [.. trail.Listed.Skip(trail.ListedAtAppend)], trail.PatientCount, status);
        }
    }
}
