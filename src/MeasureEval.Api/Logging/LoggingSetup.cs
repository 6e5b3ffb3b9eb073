using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;
using Serilog;
using Serilog.Core;
using Serilog.Events;
using Serilog.Filters;
using Microsoft.Extensions.Configuration;
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

    /// <summary>Minimum level of the service's own events (default Information).</summary>
    public const string LevelKey = "Logging:Level";

    /// <summary>Minimum level of ASP.NET Core's events (default Warning: below that they describe routine request handling).</summary>
    public const string FrameworkLevelKey = "Logging:FrameworkLevel";

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
        var level = builder.Configuration.GetValue(LevelKey, LogEventLevel.Information);
        var frameworkLevel = builder.Configuration.GetValue(FrameworkLevelKey, LogEventLevel.Warning);
        builder.Services.AddSerilog((services, config) =>
        {
            config.MinimumLevel.Is(level)
                .MinimumLevel.Override("Microsoft.AspNetCore", frameworkLevel)
                // It logs exception messages, which may quote request data; FhirExceptionHandler logs instead.
                .MinimumLevel.Override("Microsoft.AspNetCore.Diagnostics.ExceptionHandlerMiddleware", LogEventLevel.Fatal)
                // "Request starting/finished" carry the raw path and query string (?identifier=…|MRN, ?name=…) at any
                // level; the request log below replaces them with the route template.
                .Filter.ByExcluding(Matching.FromSource("Microsoft.AspNetCore.Hosting.Diagnostics"))
                .Enrich.FromLogContext()
                // The framework's request scope adds the raw path; ids in it can identify a patient.
                .Enrich.With<DropRequestPathEnricher>()
                // Sinks registered as services (tests capture every event this way).
                .ReadFrom.Services(services);
            if (json)
            {
                config.WriteTo.Console(new RenderedCompactJsonFormatter());
            }
            else
            {
                config.WriteTo.Console(outputTemplate: "[{Timestamp:HH:mm:ss} {Level:u3}] {RequestId} {Message:lj}{NewLine}{Exception}", formatProvider: System.Globalization.CultureInfo.InvariantCulture);
            }
        }, preserveStaticLogger: true);
        return builder;
    }

    /// <summary>One event per request: method, route template (not the path), status, duration.</summary>
    public static IApplicationBuilder UseMeasureEvalRequestLogging(this IApplicationBuilder app) =>
        app.UseSerilogRequestLogging(options =>
        {
            // This host's logger, not the static one: several hosts in one process (tests) would write into each other's.
            options.Logger = app.ApplicationServices.GetRequiredService<Serilog.ILogger>();
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
