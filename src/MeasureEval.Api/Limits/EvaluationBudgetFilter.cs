using System.Globalization;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Limits;

/// <summary>
/// Gives the synchronous evaluations a time budget (<c>Limits:EvaluationTimeBudget</c>): the handler's cancellation token
/// is replaced by one that also fires when the budget is spent, and a cancelled evaluation is answered 503 with
/// Retry-After and advice to ask asynchronously. A streamed export that runs out after its first rows were sent cannot
/// change its status any more: its connection is cut, so the client sees an incomplete body, never a short file.
/// </summary>
public sealed class EvaluationBudgetFilter(IOptions<LimitsOptions> options, TimeProvider time) : IEndpointFilter
{
    /// <summary>Seconds a refused client should wait before trying the same synchronous request again.</summary>
    public const int RetryAfterSeconds = 60;

    private static readonly HashSet<string> Budgeted = new(StringComparer.Ordinal)
    {
        "evaluate-measure-get", "evaluate-measure-post", "evaluate-measures", "care-gaps-get", "care-gaps-post", "care-gaps-export",
        "GetReportIndex", "GetMeasureReport",
    };

    public static IReadOnlyCollection<string> Routes => Budgeted;

    public async ValueTask<object?> InvokeAsync(EndpointFilterInvocationContext context, EndpointFilterDelegate next)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(next);
        var http = context.HttpContext;
        var name = http.GetEndpoint()?.Metadata.GetMetadata<IEndpointNameMetadata>()?.EndpointName;
        if (name is null || !Budgeted.Contains(name))
        {
            return await next(context);
        }

        var budget = options.Value.EvaluationTimeBudget;
        var timer = new CancellationTokenSource(budget, time);
        var linked = CancellationTokenSource.CreateLinkedTokenSource(http.RequestAborted, timer.Token);
        // Disposed with the response: a streamed export keeps using the token after this filter returned.
        http.Response.RegisterForDispose(linked);
        http.Response.RegisterForDispose(timer);
        // Only the handler's token: HttpContext.RequestAborted stays the client's, so the 503 below can still be written.
        for (var i = 0; i < context.Arguments.Count; i++)
        {
            if (context.Arguments[i] is CancellationToken)
            {
                context.Arguments[i] = linked.Token;
            }
        }

        try
        {
            var result = await next(context);
            // A streamed answer (the export) evaluates while it writes, after this filter has returned.
            return result is IResult streamed and not FhirResult ? new BudgetedResult(streamed, timer, () => Exceeded(budget, name)) : result;
        }
        catch (OperationCanceledException) when (timer.IsCancellationRequested && !http.Response.HasStarted)
        {
            return Exceeded(budget, name);
        }
    }

    private static RetryAfterResult Exceeded(TimeSpan budget, string routeName)
    {
        // Report pages have no asynchronous form; the FHIR operations and the export do.
        var advice = routeName.StartsWith("Get", StringComparison.Ordinal)
            ? "narrow it (a shorter period, interval=quarter over fewer quarters) or use the FHIR operations with 'Prefer: respond-async'."
            : "send the request again with the header 'Prefer: respond-async' to run it in the background, or narrow it (subject, practitioner, measureId).";
        var issue = new FhirIssue(
            ErrorCatalogue.TimeBudgetExceeded,
            $"The evaluation took longer than {budget.TotalSeconds.ToString(CultureInfo.InvariantCulture)} s (Limits:EvaluationTimeBudget) and was cancelled; " + advice);
        return new RetryAfterResult(FhirResult.Outcome(issue.Code.HttpStatus, [issue]), RetryAfterSeconds);
    }
}

/// <summary>
/// A streamed answer under a budget: cancelled before its first byte it becomes the 503; after, the connection is cut
/// (an incomplete chunked body, which clients report as an error) and the audit records 503.
/// </summary>
internal sealed class BudgetedResult(IResult inner, CancellationTokenSource timer, Func<IResult> exceeded) : IResult, INestedHttpResult
{
    public IResult Result => inner;

    public async Task ExecuteAsync(HttpContext httpContext)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        try
        {
            await inner.ExecuteAsync(httpContext);
        }
        catch (OperationCanceledException) when (timer.IsCancellationRequested && !httpContext.RequestAborted.IsCancellationRequested)
        {
            Audit.AuditTrail.Of(httpContext)?.FinalStatus = StatusCodes.Status503ServiceUnavailable;
            if (httpContext.Response.HasStarted)
            {
                httpContext.Abort();
                return;
            }

            httpContext.Response.Clear();
            await exceeded().ExecuteAsync(httpContext);
        }
    }
}

/// <summary>A FHIR answer with a Retry-After header.</summary>
public sealed class RetryAfterResult(FhirResult inner, int seconds) : IResult, IStatusCodeHttpResult, INestedHttpResult
{
    public int? StatusCode => inner.StatusCode;

    public IResult Result => inner;

    public Task ExecuteAsync(HttpContext httpContext)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        httpContext.Response.Headers.RetryAfter = seconds.ToString(CultureInfo.InvariantCulture);
        return inner.ExecuteAsync(httpContext);
    }
}
