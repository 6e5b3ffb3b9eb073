using MeasureEval.Core.Fhir;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;

namespace MeasureEval.Engine;

/// <summary>
/// Loads records from the store for FHIRPath filters. Called only for records that reach a filter, never on the
/// common path; the synchronous wait keeps the evaluator synchronous and allocation-free where no filter is used.
/// Unscoped: it loads only records named by the facts of a patient the caller's scope already admitted.
/// </summary>
public sealed class StoreRecordSource(IResourceStore store) : IRecordSource
{
    public Hl7.Fhir.Model.Resource? Load(string resourceType, string id)
    {
        var stored = store.ReadAsync(resourceType, id, DataScope.Unrestricted, CancellationToken.None).GetAwaiter().GetResult();
        return stored is { Deleted: false, Json: { } json } ? FhirJson.Parse<Hl7.Fhir.Model.Resource>(json) : null;
    }
}
