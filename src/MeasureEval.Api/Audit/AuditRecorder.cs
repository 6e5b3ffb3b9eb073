using System.Data.Common;
using MeasureEval.Api.Security;
using MeasureEval.Core.Audit;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Logging;

namespace MeasureEval.Api.Audit;

/// <summary>Builds an <see cref="AuditRecord"/> from a request and writes it; a failure is reported, never thrown.</summary>
public sealed partial class AuditRecorder(IAuditStore store, TimeProvider time, ILogger<AuditRecorder> logger)
{
    public const string Anonymous = "anonymous";

    public AuditRecord Build(HttpContext context, string routeName, AuditedRoute route, int status, AuditTrail trail)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(route);
        ArgumentNullException.ThrowIfNull(trail);
        var user = context.User;
        var authenticated = user.Identity?.IsAuthenticated == true;
        var now = time.GetUtcNow();
        return new AuditRecord
        {
            Id = Guid.CreateVersion7(now).ToString("N"),
            // Milliseconds, as stored, so the AuditEvent read back equals the one recorded.
            Recorded = DateTimeOffset.FromUnixTimeMilliseconds(now.ToUnixTimeMilliseconds()),
            Agent = authenticated ? user.FindFirst("sub")?.Value ?? Anonymous : Anonymous,
            Role = authenticated ? user.FindFirst(AccessPolicies.RoleClaim)?.Value : null,
            Payer = authenticated ? user.FindFirst(AccessPolicies.PayerClaim)?.Value : null,
            Operation = routeName,
            Interaction = route.Operation ?? route.Interaction,
            Action = route.Action,
            Method = context.Request.Method,
            Route = (context.GetEndpoint() as RouteEndpoint)?.RoutePattern.RawText ?? "",
            Status = status,
            Address = context.Connection.RemoteIpAddress?.ToString(),
            RequestId = context.TraceIdentifier,
            Patients = [.. trail.Listed],
            PatientCount = trail.PatientCount,
        };
    }

    /// <summary>
    /// Writes the record. Not cancelled with the request: an access the client gave up on still happened.
    /// False (logged, without patient data) when the store could not take it.
    /// </summary>
    public async Task<bool> TryAppendAsync(AuditRecord record)
    {
        ArgumentNullException.ThrowIfNull(record);
        try
        {
            await store.AppendAsync(record, CancellationToken.None);
            return true;
        }
        catch (Exception ex) when (ex is DbException or InvalidOperationException or TimeoutException or IOException)
        {
            LogAppendFailed(ex.GetType().Name, record.Operation, record.Status);
            return false;
        }
    }

    public async Task<bool> TryCompleteAsync(string eventId, IReadOnlyList<string> morePatients, int patientCount, int status)
    {
        try
        {
            await store.CompleteAsync(eventId, morePatients, patientCount, status, CancellationToken.None);
            return true;
        }
        catch (Exception ex) when (ex is DbException or InvalidOperationException or TimeoutException or IOException)
        {
            LogAppendFailed(ex.GetType().Name, "complete", status);
            return false;
        }
    }

    [LoggerMessage(Level = LogLevel.Error, Message = "Audit record not written ({ExceptionType}) for {Operation} answered {Status}")]
    private partial void LogAppendFailed(string exceptionType, string operation, int status);
}
