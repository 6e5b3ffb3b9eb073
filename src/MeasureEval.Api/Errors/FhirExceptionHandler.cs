using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Diagnostics;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.Logging;

namespace MeasureEval.Api.Errors;

/// <summary>
/// Last resort: anything unexpected becomes a FHIR OperationOutcome 500 (a bug, still answered in FHIR).
/// Logs the exception type and stack, not its message (messages can quote request data).
/// </summary>
public sealed partial class FhirExceptionHandler(ILogger<FhirExceptionHandler> logger) : IExceptionHandler
{
    public async ValueTask<bool> TryHandleAsync(HttpContext httpContext, Exception exception, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        ArgumentNullException.ThrowIfNull(exception);
        FhirIssue issue;
        if (exception is BadHttpRequestException bad)
        {
            issue = bad.StatusCode == StatusCodes.Status413PayloadTooLarge
                ? new FhirIssue(ErrorCatalogue.BodyTooLarge, "The body is larger than the server accepts.")
                : new FhirIssue(ErrorCatalogue.InvalidStructure with { HttpStatus = bad.StatusCode }, "The request could not be read.");
        }
        else
        {
            LogUnexpected(exception.GetType().FullName ?? exception.GetType().Name, exception.StackTrace ?? "");
            issue = new FhirIssue(ErrorCatalogue.Unexpected, $"An unexpected error occurred; quote request id {httpContext.TraceIdentifier} when reporting it.");
        }

        await FhirResult.Outcome(issue.Code.HttpStatus, [issue]).ExecuteAsync(httpContext);
        return true;
    }

    [LoggerMessage(Level = LogLevel.Error, Message = "Unhandled {ExceptionType} {StackTrace}")]
    private partial void LogUnexpected(string exceptionType, string stackTrace);
}
