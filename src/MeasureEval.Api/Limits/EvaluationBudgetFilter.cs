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
        for (var i = 0; i < context.Arguments.Count; i++)
        {
            if (context.Arguments[i] is CancellationToken)
            {
                context.Arguments[i] = linked.Token;
            }
        }

        http.RequestAborted = linked.Token;
        try
        {
            return await next(context);
        }
        catch (OperationCanceledException) when (timer.IsCancellationRequested && !http.Response.HasStarted)
        {
            var issue = new FhirIssue(
                ErrorCatalogue.TimeBudgetExceeded,
                $"The evaluation took longer than {budget.TotalSeconds.ToString(CultureInfo.InvariantCulture)} s (Limits:EvaluationTimeBudget) and was cancelled; "
                + "send the request again with the header 'Prefer: respond-async' to run it in the background, or narrow it (subject, practitioner, measureId).");
            return new RetryAfterResult(FhirResult.Outcome(issue.Code.HttpStatus, [issue]), RetryAfterSeconds);
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
