using Hl7.Fhir.Model;

namespace MeasureEval.Core.Index;

/// <summary>
/// Groups resources held in memory (a bundle, a folder of NDJSON) into per-patient index entries,
/// the same entries the store keeps at write time.
/// </summary>
public static class PatientFactsAssembler
{
    /// <summary>Index entries for every patient the resources name, in ascending (ordinal) patient id order.</summary>
    public static IReadOnlyList<PatientFacts> Assemble(IEnumerable<Resource> resources)
    {
        ArgumentNullException.ThrowIfNull(resources);
        var byPatient = new SortedDictionary<string, (Demographics? Demographics, List<ClinicalFact> Facts, List<CoverageFact> Coverages)>(StringComparer.Ordinal);
        foreach (var resource in resources)
        {
            if (!FactExtractor.TryExtract(resource, out var contribution) || contribution is null)
            {
                continue;
            }

            if (!byPatient.TryGetValue(contribution.PatientId, out var entry))
            {
                entry = (null, [], []);
            }

            switch (contribution)
            {
                case DemographicsContribution d:
                    entry.Demographics = d.Demographics;
                    break;
                case ClinicalContribution c:
                    entry.Facts.Add(c.Fact);
                    break;
                case CoverageContribution c:
                    entry.Coverages.Add(c.Coverage);
                    break;
            }

            byPatient[contribution.PatientId] = entry;
        }

        return [.. byPatient.Select(p => new PatientFacts
        {
            PatientId = p.Key,
            Demographics = p.Value.Demographics,
            Facts = p.Value.Facts,
            Coverages = p.Value.Coverages,
        })];
    }
}
