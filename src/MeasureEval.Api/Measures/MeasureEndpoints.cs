using System.Buffers;
using System.Security.Claims;
using Hl7.Fhir.Model;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Ingest;
using MeasureEval.Api.Jobs;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using MeasureEval.Engine.Reports;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;
using Interaction = Hl7.Fhir.Model.CapabilityStatement.TypeRestfulInteraction;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Measures;

/// <summary>Measures, their logic libraries and value sets, and $evaluate-measure.</summary>
public static class MeasureEndpoints
{
    private const string EvaluateDefinition = "http://hl7.org/fhir/OperationDefinition/Measure-evaluate-measure";
    private static readonly string[] DefinitionBody = [ReportExtensions.DefinitionMediaType];

    public static IEndpointRouteBuilder MapMeasureEndpoints(this IEndpointRouteBuilder app)
    {
        var group = app.MapGroup("").WithTags("Measures");
        var fhirBody = FhirEndpointExtensions.ResourceMediaTypes;
        group.MapGet("/Measure", ListMeasuresAsync).WithName("measure-list").RequireAuthorization(AccessPolicies.Definitions).WithSummary("Every loaded measure as a FHIR Measure")
            .WithFhir([], [200], 406);
        group.MapGet("/Measure/{id}", ReadMeasureAsync).WithName("measure-read").RequireAuthorization(AccessPolicies.Definitions).WithSummary("One measure as a FHIR Measure whose criteria name the logic")
            .WithFhir([], [200], 404, 406);
        group.MapPut("/Measure/{id}", PutMeasureAsync).WithName("measure-put").RequireAuthorization(AccessPolicies.Manage)
            .WithSummary("Load or replace a measure written in the definition format (application/vnd.measureeval+json); kept across restarts")
            .WithFhir(DefinitionBody, [200, 201], 400, 406, 413, 415);
        group.MapGet("/Library/{id}", ReadLibraryAsync).WithName("library-read").RequireAuthorization(AccessPolicies.Definitions).WithSummary("The definition file of a measure or shared library, base64 in Library.content")
            .WithFhir([], [200], 404, 406);
        group.MapPut("/ValueSet/{id}", PutValueSetAsync).WithName("valueset-put").RequireAuthorization(AccessPolicies.Manage).WithSummary("Load or replace a value set (FHIR R4 ValueSet) without a rebuild; kept across restarts")
            .WithFhir(fhirBody, [200, 201], 400, 406, 413, 415);
        group.MapGet("/Measure/{id}/$evaluate-measure", EvaluateGetAsync).WithName("evaluate-measure-get").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Evaluate one measure: periodStart, periodEnd, subject (Patient/x or Group/x), practitioner, reportType")
            .WithFhir([], [200, 202], 400, 404, 406)
            .WithFhirOperation("evaluate-measure", EvaluateDefinition, "Measure", "periodStart, periodEnd (dates, default the current calendar year), subject Patient/x or Group/x, practitioner (Patient.generalPractitioner), reportType subject | subject-list | population");
        group.MapPost("/Measure/{id}/$evaluate-measure", EvaluatePostAsync).WithName("evaluate-measure-post").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Evaluate one measure with a Parameters body")
            .WithFhir(fhirBody, [200, 202], 400, 404, 406, 413, 415);
        group.MapPost("/Measure/$evaluate-measure", EvaluateManyAsync).WithName("evaluate-measures").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Evaluate several measures (Parameters, measureId repeated) in one pass over the patients; a Bundle of MeasureReports")
            .WithFhir(fhirBody, [200, 202], 400, 404, 406, 413, 415)
            .WithFhirOperation("evaluate-measure", EvaluateDefinition, "Measure", "type level: measureId repeated; the other parameters as on an instance; answers a Bundle of MeasureReports, one per measure");
        return app;
    }

    public static async Task<FhirResult> ListMeasuresAsync(HttpRequest request, MeasureCatalog catalog, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(catalog);
        var repository = await catalog.GetAsync(cancellationToken);
        var baseUrl = FhirBaseUrl.Of(request);
        var bundle = new Bundle { Id = Guid.NewGuid().ToString(), Type = Bundle.BundleType.Searchset, Total = repository.Measures.Count };
        bundle.Link.Add(new Bundle.LinkComponent { Relation = "self", Url = $"{baseUrl}/Measure" });
        foreach (var measure in repository.Measures)
        {
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = $"{baseUrl}/Measure/{measure.Id}",
                Resource = MeasureResources.ToMeasure(measure),
                Search = new Bundle.SearchComponent { Mode = Bundle.SearchEntryMode.Match },
            });
        }

        return FhirResult.Of(200, bundle);
    }

    public static async Task<FhirResult> ReadMeasureAsync(string id, MeasureCatalog catalog, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(catalog);
        var repository = await catalog.GetAsync(cancellationToken);
        return repository.TryGetMeasure(id, out var measure)
            ? FhirResult.Of(200, MeasureResources.ToMeasure(measure))
            : FhirResult.Outcome(new FhirIssue(MeasureErrors.UnknownMeasure, $"no measure '{id}' is loaded"));
    }

    /// <summary>A measure's or definition library's file; any other Library is read from the store as usual.</summary>
    public static async Task<FhirResult> ReadLibraryAsync(string id, MeasureCatalog catalog, IResourceStore store, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(catalog);
        var repository = await catalog.GetAsync(cancellationToken);
        if (repository.TryGetMeasure(id, out var measure))
        {
            return FhirResult.Of(200, MeasureResources.ToLibrary(measure));
        }

        return repository.TryGetLibrary(id, out var library)
            ? FhirResult.Of(200, MeasureResources.ToLibrary(library))
            : await Resources.ResourceEndpoints.ReadInScopeAsync("Library", id, DataScope.Unrestricted, store, cancellationToken);
    }

    public static async Task<FhirResult> PutMeasureAsync(string id, HttpRequest request, MeasureCatalog catalog, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(catalog);
        ArgumentNullException.ThrowIfNull(options);
        var body = await ReadBytesAsync(request, options.Value.MaxBodyBytes, cancellationToken);
        if (body is null)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.BodyTooLarge, $"The body exceeds the limit of {options.Value.MaxBodyBytes} bytes (Ingest:MaxBodyBytes)."));
        }

        var file = new DefinitionFile($"{id}.measure.json", DefinitionFileKind.Measure, body);
        var library = new Library
        {
            Id = id,
            Status = PublicationStatus.Active,
            Type = new CodeableConcept("http://terminology.hl7.org/CodeSystem/library-type", "logic-library"),
            Identifier = [new Identifier(MeasureCatalog.DefinitionFileSystem, file.Name)],
            Content = [new Attachment { ContentType = ReportExtensions.DefinitionMediaType, Data = body }],
        };
        var (issues, created) = await catalog.PutAsync(file, library, cancellationToken);
        if (issues.Count > 0)
        {
            return FhirResult.Outcome(ToIssues(issues));
        }

        var repository = await catalog.GetAsync(cancellationToken);
        return FhirResult.Of(created ? 201 : 200, MeasureResources.ToMeasure(repository.TryGetMeasure(id, out var measure) ? measure : throw new InvalidOperationException("a measure that loaded is in the repository")));
    }

    public static async Task<FhirResult> PutValueSetAsync(string id, HttpRequest request, MeasureCatalog catalog, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(catalog);
        ArgumentNullException.ThrowIfNull(options);
        var (valueSet, refusal) = await FhirRequestBody.ReadResourceAsync<ValueSet>(request, options.Value, cancellationToken);
        if (valueSet is null)
        {
            return refusal!;
        }

        if (valueSet.Id != id)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.IdMismatch, $"the body's id '{valueSet.Id}' is not '{id}'", "ValueSet.id"));
        }

        var file = new DefinitionFile($"valuesets/{id}.json", DefinitionFileKind.ValueSet, System.Text.Encoding.UTF8.GetBytes(FhirJson.Serialize(valueSet)));
        var (issues, created) = await catalog.PutAsync(file, valueSet, cancellationToken);
        return issues.Count > 0 ? FhirResult.Outcome(ToIssues(issues, fhirRoot: "ValueSet")) : FhirResult.Of(created ? 201 : 200, valueSet);
    }

    public static async Task<FhirResult> EvaluateGetAsync(string id, HttpRequest request, ClaimsPrincipal user, MeasureCatalog catalog, MeasureEvaluationService service, TimeProvider time, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        var issues = new List<FhirIssue>();
        if (!EvaluateParameters.TryRead(request.Query, time, issues, out var parameters))
        {
            return FhirResult.Outcome(issues);
        }

        if (AsyncRequests.Wanted(request))
        {
            return await AsyncRequests.StartAsync(request, JobKinds.EvaluateMeasure, EvaluateJobParameters.From(id, parameters!, FhirFormat.Of(request.HttpContext)), cancellationToken);
        }

        return await EvaluateOneAsync(id, parameters!, CallerScope.Of(user), catalog, service, null, request.HttpContext.Response, cancellationToken);
    }

    public static async Task<FhirResult> EvaluatePostAsync(string id, HttpRequest request, ClaimsPrincipal user, MeasureCatalog catalog, MeasureEvaluationService service, TimeProvider time, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        var (parameters, error) = await ReadParametersAsync(request, time, options, cancellationToken);
        if (error is null && AsyncRequests.Wanted(request))
        {
            return await AsyncRequests.StartAsync(request, JobKinds.EvaluateMeasure, EvaluateJobParameters.From(id, parameters!, FhirFormat.Of(request.HttpContext)), cancellationToken);
        }

        return error ?? await EvaluateOneAsync(id, parameters!, CallerScope.Of(user), catalog, service, null, request.HttpContext.Response, cancellationToken);
    }

    public static async Task<FhirResult> EvaluateManyAsync(HttpRequest request, ClaimsPrincipal user, MeasureCatalog catalog, MeasureEvaluationService service, TimeProvider time, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(catalog);
        ArgumentNullException.ThrowIfNull(service);
        var (parameters, error) = await ReadParametersAsync(request, time, options, cancellationToken);
        if (error is not null)
        {
            return error;
        }

        if (parameters!.MeasureIds.Count == 0)
        {
            return FhirResult.Outcome(new FhirIssue(MeasureErrors.InvalidParameter, "name the measures with measureId (repeated)", "measureId"));
        }

        if (AsyncRequests.Wanted(request))
        {
            return await AsyncRequests.StartAsync(request, JobKinds.EvaluateMeasure, EvaluateJobParameters.From(null, parameters, FhirFormat.Of(request.HttpContext)), cancellationToken);
        }

        return await EvaluateMeasuresAsync(parameters, CallerScope.Of(user), catalog, service, null, request.HttpContext.Response, cancellationToken);
    }

    /// <summary>The type-level operation for parsed parameters: what the POST handler and an asynchronous job answer.</summary>
    internal static Task<FhirResult> EvaluateMeasuresAsync(
        EvaluateParameters parameters, DataScope scope, MeasureCatalog catalog, MeasureEvaluationService service, IProgress<EvaluationProgress>? progress,
        CancellationToken cancellationToken) =>
        EvaluateMeasuresAsync(parameters, scope, catalog, service, progress, null, cancellationToken);

    /// <summary>As above; a synchronous answer (<paramref name="response"/>) also carries the cluster headers.</summary>
    private static async Task<FhirResult> EvaluateMeasuresAsync(
        EvaluateParameters parameters, DataScope scope, MeasureCatalog catalog, MeasureEvaluationService service, IProgress<EvaluationProgress>? progress,
        HttpResponse? response, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(catalog);
        ArgumentNullException.ThrowIfNull(service);
        var repository = await catalog.GetAsync(cancellationToken);
        var measures = new List<MeasureDefinition>();
        var issues = new List<FhirIssue>();
        foreach (var measureId in parameters.MeasureIds.Distinct(StringComparer.Ordinal))
        {
            if (repository.TryGetMeasure(measureId, out var measure))
            {
                measures.Add(measure);
            }
            else
            {
                issues.Add(new FhirIssue(MeasureErrors.UnknownMeasure, $"no measure '{measureId}' is loaded", "measureId"));
            }
        }

        if (issues.Count > 0)
        {
            return FhirResult.Outcome(issues);
        }

        var outcome = await service.EvaluateAsync(repository, measures, parameters, scope, progress, cancellationToken);
        if (outcome.Error is not null)
        {
            return FhirResult.Outcome(outcome.Error);
        }

        if (response is not null)
        {
            ClusterHeaders.Write(response, outcome.Cluster);
        }

        var reports = outcome.Reports;
        var bundle = new Bundle { Id = Guid.NewGuid().ToString(), Type = Bundle.BundleType.Collection };
        foreach (var report in reports)
        {
            bundle.Entry.Add(new Bundle.EntryComponent { FullUrl = $"urn:uuid:{Guid.Parse(report.Id!)}", Resource = report });
        }

        return FhirResult.Of(200, bundle);
    }

    /// <summary>One measure for parsed parameters: what the GET and POST handlers and an asynchronous job answer.</summary>
    internal static Task<FhirResult> EvaluateOneAsync(
        string id, EvaluateParameters parameters, DataScope scope, MeasureCatalog catalog, MeasureEvaluationService service, IProgress<EvaluationProgress>? progress,
        CancellationToken cancellationToken) =>
        EvaluateOneAsync(id, parameters, scope, catalog, service, progress, null, cancellationToken);

    /// <summary>As above; a synchronous answer (<paramref name="response"/>) also carries the cluster headers.</summary>
    private static async Task<FhirResult> EvaluateOneAsync(
        string id, EvaluateParameters parameters, DataScope scope, MeasureCatalog catalog, MeasureEvaluationService service, IProgress<EvaluationProgress>? progress,
        HttpResponse? response, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(catalog);
        ArgumentNullException.ThrowIfNull(service);
        var repository = await catalog.GetAsync(cancellationToken);
        if (!repository.TryGetMeasure(id, out var measure))
        {
            return FhirResult.Outcome(new FhirIssue(MeasureErrors.UnknownMeasure, $"no measure '{id}' is loaded"));
        }

        var outcome = await service.EvaluateAsync(repository, [measure], parameters, scope, progress, cancellationToken);
        if (outcome.Error is not null)
        {
            return FhirResult.Outcome(outcome.Error);
        }

        if (response is not null)
        {
            ClusterHeaders.Write(response, outcome.Cluster);
        }

        return FhirResult.Of(200, outcome.Reports[0]);
    }

    private static async Task<(EvaluateParameters? Parameters, FhirResult? Error)> ReadParametersAsync(HttpRequest request, TimeProvider time, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(options);
        var (body, refusal) = await FhirRequestBody.ReadResourceAsync<Parameters>(request, options.Value, cancellationToken);
        if (body is null)
        {
            return (null, refusal);
        }

        var issues = new List<FhirIssue>();
        return EvaluateParameters.TryRead(body, time, issues, out var parameters) ? (parameters, null) : (null, FhirResult.Outcome(issues));
    }

    /// <summary>Definition issues as OperationOutcome issues; the JSON path becomes the expression ("populations.numerator.any[2]").</summary>
    private static List<FhirIssue> ToIssues(IReadOnlyList<DefinitionIssue> issues, string? fhirRoot = null) =>
        [.. issues.Select(i =>
        {
            var path = i.Path == "$" ? "" : i.Path.TrimStart('$').TrimStart('.');
            var expression = fhirRoot is null ? (path.Length == 0 ? null : path) : (path.Length == 0 ? fhirRoot : $"{fhirRoot}.{path}");
            return new FhirIssue(MeasureErrors.InvalidDefinition, $"{i.File}: {i.Message}", expression);
        })];

    private static async Task<byte[]?> ReadBytesAsync(HttpRequest request, long limit, CancellationToken cancellationToken)
    {
        if (request.ContentLength > limit)
        {
            return null;
        }

        // The configured limit, not the server's fixed default (as for every other body).
        var sizeFeature = request.HttpContext.Features.Get<Microsoft.AspNetCore.Http.Features.IHttpMaxRequestBodySizeFeature>();
        if (sizeFeature is { IsReadOnly: false })
        {
            sizeFeature.MaxRequestBodySize = limit;
        }

        var reader = request.BodyReader;
        while (true)
        {
            var read = await reader.ReadAsync(cancellationToken);
            if (read.Buffer.Length > limit)
            {
                reader.AdvanceTo(read.Buffer.End);
                return null;
            }

            if (read.IsCompleted)
            {
                var bytes = read.Buffer.ToArray();
                reader.AdvanceTo(read.Buffer.End);
                return bytes;
            }

            reader.AdvanceTo(read.Buffer.Start, read.Buffer.End);
        }
    }
}
