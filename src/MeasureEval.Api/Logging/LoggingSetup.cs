using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;
using Serilog;
using Serilog.Core;
using Serilog.Events;
using Serilog.Formatting.Compact;

namespace MeasureEval.Api.Logging;

/// <summary>
/// Structured console logging. Events carry method, route template, status and duration, never paths with ids,
/// query strings, headers or bodies (they can hold patient data).
/// </summary>
public static class LoggingSetup
{
    public const string JsonSwitch = "--log-json";
    public const string JsonKey = "Logging:Json";

    /// <summary>Turns the bare <c>--log-json</c> flag into a configuration value before the host parses arguments.</summary>
    public static string[] ExpandFlags(string[] args)
    {
        ArgumentNullException.ThrowIfNull(args);
        return [.. args.Select(a => a == JsonSwitch ? $"--{JsonKey}=true" : a)];
    }

    public static WebApplicationBuilder AddMeasureEvalLogging(this WebApplicationBuilder builder)
    {
        ArgumentNullException.ThrowIfNull(builder);
        var json = builder.Configuration.GetValue<bool>(JsonKey);
        builder.Services.AddSerilog(config =>
        {
            config.MinimumLevel.Information()
                // Framework request logs carry raw paths (ids); the request log below replaces them.
                .MinimumLevel.Override("Microsoft.AspNetCore", LogEventLevel.Warning)
                // It logs exception messages, which may quote request data; FhirExceptionHandler logs instead.
                .MinimumLevel.Override("Microsoft.AspNetCore.Diagnostics.ExceptionHandlerMiddleware", LogEventLevel.Fatal)
                .Enrich.FromLogContext()
                // The framework's request scope adds the raw path; ids in it can identify a patient.
                .Enrich.With<DropRequestPathEnricher>();
            if (json)
            {
                config.WriteTo.Console(new RenderedCompactJsonFormatter());
            }
            else
            {
                config.WriteTo.Console(outputTemplate: "[{Timestamp:HH:mm:ss} {Level:u3}] {RequestId} {Message:lj}{NewLine}{Exception}", formatProvider: System.Globalization.CultureInfo.InvariantCulture);
            }
        });
        return builder;
    }

    /// <summary>One event per request: method, route template (not the path), status, duration.</summary>
    public static IApplicationBuilder UseMeasureEvalRequestLogging(this IApplicationBuilder app) =>
        app.UseSerilogRequestLogging(options =>
        {
            options.MessageTemplate = "HTTP {RequestMethod:l} {RouteTemplate:l} responded {StatusCode} in {Elapsed:0.0} ms";
            options.GetMessageTemplateProperties = (context, _, elapsed, status) =>
            [
                new LogEventProperty("RequestMethod", new ScalarValue(context.Request.Method)),
                new LogEventProperty("RouteTemplate", new ScalarValue(RouteTemplateOf(context))),
                new LogEventProperty("StatusCode", new ScalarValue(status)),
                new LogEventProperty("Elapsed", new ScalarValue(elapsed)),
            ];
        });

    private static string RouteTemplateOf(HttpContext context) =>
        context.GetEndpoint() is RouteEndpoint endpoint ? "/" + (endpoint.RoutePattern.RawText ?? "").TrimStart('/') : "(no route)";

    private sealed class DropRequestPathEnricher : ILogEventEnricher
    {
        public void Enrich(LogEvent logEvent, ILogEventPropertyFactory propertyFactory) => logEvent.RemovePropertyIfPresent("RequestPath");
    }
}
