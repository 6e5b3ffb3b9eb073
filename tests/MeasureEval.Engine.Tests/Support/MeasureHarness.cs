using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine.Tests.Support;

/// <summary>Population membership of one patient as 0/1 counts, so that a failure shows all five at once.</summary>
public sealed record CaseCounts(int InitialPopulation, int Denominator, int DenominatorExclusion, int DenominatorException, int Numerator);

public sealed record CaseResult(CaseCounts Populations, IReadOnlyList<DataQualityFinding> Findings, IReadOnlyList<CountDetail> Counts, IReadOnlyDictionary<string, string> Strata);

/// <summary>
/// Evaluates one measure for the single patient of a case fixture
/// (Cases/&lt;measure-id&gt;/&lt;case&gt;.json, a FHIR R4 Bundle of type collection) against the
/// measure files of the repository's measures/ folder.
/// </summary>
public static class MeasureHarness
{
    public const string DefaultPeriodStart = "2026-01-01";
    public const string DefaultPeriodEnd = "2026-12-31";

    public static string CasesDirectory => Path.Combine(AppContext.BaseDirectory, "Cases");

    public static CaseResult Evaluate(string measureId, string caseFile, string periodStart = DefaultPeriodStart, string periodEnd = DefaultPeriodEnd)
    {
        var repository = RepositoryPaths.Repository;
        if (!repository.TryGetMeasure(measureId, out var measure))
        {
            Assert.Fail($"measure {measureId} is not loaded; definition issues: {string.Join("; ", RepositoryPaths.RepositoryIssues.Select(i => $"{i.File} {i.Path}: {i.Message}"))}");
        }

        var bundle = LoadCase(Path.Combine(CasesDirectory, measureId, caseFile + ".json"));
        var resources = bundle.Entry.Select(e => e.Resource).OfType<Resource>().ToList();
        var patient = Assert.Single(PatientFactsAssembler.Assemble(resources));
        var period = new MeasurementPeriod(ParseDate(periodStart), ParseDate(periodEnd));

        var result = new MeasureEvaluator(repository, new BundleRecords(resources)).Evaluate(measure, patient, period);

        return new CaseResult(
            new CaseCounts(
                Count(result.InitialPopulation),
                Count(result.Denominator),
                Count(result.DenominatorExclusion),
                Count(result.DenominatorException),
                Count(result.Numerator)),
            result.Findings,
            result.Counts,
            result.Strata);
    }

    /// <summary>Parses a fixture with the service's strict parser: an invalid fixture fails here, not silently later.</summary>
    public static Bundle LoadCase(string path) => FhirJson.Parse<Bundle>(File.ReadAllText(path));

    private static int Count(bool member) => member ? 1 : 0;

    private static DateOnly ParseDate(string text) => DateOnly.ParseExact(text, "yyyy-MM-dd", CultureInfo.InvariantCulture);

    /// <summary>Serves the fixture's own resources to FHIRPath filters, as the store would.</summary>
    private sealed class BundleRecords(IReadOnlyList<Resource> resources) : IRecordSource
    {
        public Resource? Load(string resourceType, string id) =>
            resources.FirstOrDefault(r => r.TypeName == resourceType && r.Id == id);
    }
}
