using System.Globalization;
using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.WebUtilities;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace MeasureEval.Api.OpenApi;

/// <summary>
/// Documents FHIR endpoints from their <see cref="FhirEndpointMetadata"/>: request media types, FHIR resource bodies,
/// OperationOutcome errors, and the <c>_format</c>/<c>_pretty</c> parameters.
/// </summary>
public sealed class FhirOperationFilter : IOperationFilter
{
    public const string ResourceSchema = "FhirResource";
    public const string OutcomeSchema = "OperationOutcome";

    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        ArgumentNullException.ThrowIfNull(context);
        var metadata = context.ApiDescription.ActionDescriptor.EndpointMetadata.OfType<FhirEndpointMetadata>().FirstOrDefault();
        if (metadata is null)
        {
            return;
        }

        EnsureSchemas(context.SchemaRepository);
        var resource = new OpenApiSchemaReference(ResourceSchema, context.Document);
        var outcome = new OpenApiSchemaReference(OutcomeSchema, context.Document);
        if (metadata.RequestMediaTypes.Count > 0)
        {
            operation.RequestBody = new OpenApiRequestBody
            {
                Required = true,
                Content = metadata.RequestMediaTypes.ToDictionary(m => m, _ => new OpenApiMediaType { Schema = resource }),
            };
        }

        operation.Parameters ??= [];
        operation.Parameters.Add(new OpenApiParameter
        {
            Name = "_format",
            In = ParameterLocation.Query,
            Description = "Response format: json, application/fhir+json or application/json (overrides Accept).",
            Schema = new OpenApiSchema { Type = JsonSchemaType.String },
        });
        operation.Parameters.Add(new OpenApiParameter
        {
            Name = "_pretty",
            In = ParameterLocation.Query,
            Description = "true: indented JSON.",
            Schema = new OpenApiSchema { Type = JsonSchemaType.Boolean },
        });

        operation.Responses = [];
        foreach (var status in metadata.SuccessStatuses)
        {
            operation.Responses[status.ToString(CultureInfo.InvariantCulture)] = status == 204
                ? new OpenApiResponse { Description = ReasonPhrases.GetReasonPhrase(status) }
                : new OpenApiResponse { Description = ReasonPhrases.GetReasonPhrase(status), Content = Fhir(resource) };
        }

        foreach (var status in metadata.ErrorStatuses)
        {
            operation.Responses[status.ToString(CultureInfo.InvariantCulture)] = new OpenApiResponse
            {
                Description = ReasonPhrases.GetReasonPhrase(status) + " (OperationOutcome)",
                Content = Fhir(outcome),
            };
        }
    }

    private static Dictionary<string, OpenApiMediaType> Fhir(IOpenApiSchema schema) =>
        FhirEndpointExtensions.ResourceMediaTypes.ToDictionary(m => m, _ => new OpenApiMediaType { Schema = schema });

    private static void EnsureSchemas(SchemaRepository repository)
    {
        if (repository.Schemas.ContainsKey(ResourceSchema))
        {
            return;
        }

        repository.AddDefinition(ResourceSchema, new OpenApiSchema
        {
            Type = JsonSchemaType.Object,
            Description = "A FHIR R4 resource in JSON (http://hl7.org/fhir/R4/json.html); NDJSON bodies carry one per line.",
            Required = new HashSet<string> { "resourceType" },
            Properties = new Dictionary<string, IOpenApiSchema> { ["resourceType"] = new OpenApiSchema { Type = JsonSchemaType.String } },
        });
        repository.AddDefinition(OutcomeSchema, new OpenApiSchema
        {
            Type = JsonSchemaType.Object,
            Description = "A FHIR R4 OperationOutcome; each issue has severity, code, details.coding (stable MEV-* code), diagnostics and expression.",
            Required = new HashSet<string> { "resourceType", "issue" },
            Properties = new Dictionary<string, IOpenApiSchema>
            {
                ["resourceType"] = new OpenApiSchema { Type = JsonSchemaType.String },
                ["issue"] = new OpenApiSchema { Type = JsonSchemaType.Array, Items = new OpenApiSchema { Type = JsonSchemaType.Object } },
            },
        });
    }
}
