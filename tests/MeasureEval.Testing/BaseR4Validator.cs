using Firely.Fhir.Validation;
using Hl7.Fhir.Model;
using Hl7.Fhir.Specification.Source;
using Hl7.Fhir.Specification.Terminology;

namespace MeasureEval.Testing;

/// <summary>
/// Validates resources against the base FHIR R4 (4.0.1) StructureDefinitions shipped in the
/// specification package. Building it costs seconds, so tests share one; the validator is not
/// documented as thread-safe, hence the lock.
/// </summary>
public sealed class BaseR4Validator
{
    private static readonly Lazy<BaseR4Validator> SharedInstance = new(() => new BaseR4Validator());
    private readonly Validator _validator;
    private readonly Lock _gate = new();

    private BaseR4Validator()
    {
        var resolver = new CachedResolver(ZipSource.CreateValidationSource());
        _validator = new Validator(resolver, new LocalTerminologyService(resolver.AsAsync()));
    }

    public static BaseR4Validator Shared => SharedInstance.Value;

    /// <summary>The issues of severity error or fatal, as "location: message" lines (empty when valid).</summary>
    public IReadOnlyList<string> Errors(Resource resource)
    {
        OperationOutcome outcome;
        lock (_gate)
        {
            outcome = _validator.Validate(resource);
        }

        return [.. outcome.Issue
            .Where(i => i.Severity is OperationOutcome.IssueSeverity.Error or OperationOutcome.IssueSeverity.Fatal)
            .Select(i => $"{string.Join(",", i.Expression)}: {i.Details?.Text ?? i.Diagnostics}")];
    }
}
