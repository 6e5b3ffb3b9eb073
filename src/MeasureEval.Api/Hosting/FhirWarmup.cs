using MeasureEval.Core.Fhir;
using Microsoft.Extensions.Hosting;

namespace MeasureEval.Api.Hosting;

/// <summary>The first parse and serialize in a process cost most of a second (model reflection): pay it at start, not on a request.</summary>
public sealed class FhirWarmup : IHostedService
{
    public Task StartAsync(CancellationToken cancellationToken)
    {
        var json = """{"resourceType":"Bundle","type":"collection","entry":[{"resource":{"resourceType":"Patient","id":"warmup","birthDate":"2000-01-01"}}]}"""u8.ToArray();
        if (FhirJson.TryParseResource(json, FhirJson.DefaultMaxDepth, out var resource, out _) && resource is not null)
        {
            FhirJson.Serialize(resource);
        }

        return Task.CompletedTask;
    }

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
