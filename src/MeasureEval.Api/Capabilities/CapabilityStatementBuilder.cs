using System.Reflection;
using Hl7.Fhir.Model;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Search;
using Microsoft.AspNetCore.Routing;

namespace MeasureEval.Api.Capabilities;

/// <summary>Builds the CapabilityStatement from the capability metadata of the mapped endpoints and the search registry.</summary>
public sealed class CapabilityStatementBuilder(EndpointDataSource endpoints, TimeProvider time)
{
    private readonly DateTimeOffset _startedAt = time.GetUtcNow();

    public CapabilityStatement Build(string baseUrl)
    {
        var metadata = endpoints.Endpoints.SelectMany(e => e.Metadata).ToList();
        var typeInteractions = metadata.OfType<FhirTypeInteractionMetadata>().Select(m => m.Interaction).Distinct().Order().ToList();
        var systemInteractions = metadata.OfType<FhirSystemInteractionMetadata>().Select(m => m.Interaction).Distinct().Order().ToList();
        var operations = metadata.OfType<FhirOperationMetadata>().DistinctBy(o => (o.Name, o.ResourceType)).ToList();
        var version = typeof(CapabilityStatementBuilder).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "0";

        var rest = new CapabilityStatement.RestComponent { Mode = CapabilityStatement.RestfulCapabilityMode.Server };
        foreach (var type in FhirResourceTypes.All)
        {
            var resource = new CapabilityStatement.ResourceComponent
            {
                Type = type,
                Interaction = [.. typeInteractions.Select(i => new CapabilityStatement.ResourceInteractionComponent { Code = i })],
                Versioning = CapabilityStatement.ResourceVersionPolicy.Versioned,
                ReadHistory = typeInteractions.Contains(CapabilityStatement.TypeRestfulInteraction.Vread),
                UpdateCreate = typeInteractions.Contains(CapabilityStatement.TypeRestfulInteraction.Update),
                ConditionalCreate = typeInteractions.Contains(CapabilityStatement.TypeRestfulInteraction.Create),
                ConditionalUpdate = false,
                ConditionalDelete = CapabilityStatement.ConditionalDeleteStatus.NotSupported,
                SearchParam = typeInteractions.Contains(CapabilityStatement.TypeRestfulInteraction.SearchType)
                    ? [.. SearchParameterRegistry.For(type).Select(p => new CapabilityStatement.SearchParamComponent
                    {
                        Name = p.Name,
                        Definition = p.DefinitionUrl,
                        Type = p.Type,
                        Documentation = p.Documentation,
                    })]
                    : [],
                Operation = [.. operations.Where(o => o.ResourceType == type).Select(ToComponent)],
            };
            rest.Resource.Add(resource);
        }

        rest.Interaction = [.. systemInteractions.Select(i => new CapabilityStatement.SystemInteractionComponent { Code = i })];
        rest.Operation = [.. operations.Where(o => o.ResourceType is null).Select(ToComponent)];

        return new CapabilityStatement
        {
            Status = PublicationStatus.Active,
            Date = _startedAt.ToString("yyyy-MM-ddTHH:mm:ssK", System.Globalization.CultureInfo.InvariantCulture),
            Kind = CapabilityStatementKind.Instance,
            Software = new CapabilityStatement.SoftwareComponent { Name = "MeasureEval", Version = version },
            Implementation = new CapabilityStatement.ImplementationComponent { Description = "MeasureEval FHIR R4 service", Url = baseUrl },
            FhirVersion = FHIRVersion.N4_0_1,
            Format = [FhirFormat.FhirJson, FhirFormat.Json, "json"],
            Rest = [rest],
        };
    }

    private static CapabilityStatement.OperationComponent ToComponent(FhirOperationMetadata operation) =>
        new() { Name = operation.Name, Definition = operation.Definition, Documentation = operation.Documentation };
}
