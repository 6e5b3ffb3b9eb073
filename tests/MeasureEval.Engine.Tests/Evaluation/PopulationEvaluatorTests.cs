using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Engine.Reports;
using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Evaluation;

/// <summary>Parallel population summaries against the serial pass, on the demo population (fhir-bundles/demo, 500 patients).</summary>
public sealed class PopulationEvaluatorTests
{
    private static readonly Lazy<IReadOnlyList<PatientFacts>> Demo = new(() =>
    {
        var resources = Directory.GetFiles(Path.Combine(RepositoryPaths.Root, "fhir-bundles", "demo"), "bundle-*.json").Order(StringComparer.Ordinal)
            .SelectMany(f => FhirJson.Parse<Bundle>(File.ReadAllText(f)).Entry.Select(e => e.Resource).OfType<Resource>())
            .ToList();
        return PatientFactsAssembler.Assemble(resources);
    });

    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(8)]
    public async System.Threading.Tasks.Task SummarizeAsync_ParallelWorkers_ReportsEqualSerialForEveryMeasure(int workers)
    {
        IReadOnlyList<MeasureDefinition> measures = [.. RepositoryPaths.Repository.Measures];
        var period = new MeasurementPeriod(new DateOnly(2026, 1, 1), new DateOnly(2026, 12, 31));
        var evaluator = new MeasureEvaluator(RepositoryPaths.Repository);
        Assert.True(Demo.Value.Count >= 500, $"demo population has {Demo.Value.Count} patients");
        Assert.True(measures.Count >= 9, $"{measures.Count} measures loaded");

        var serial = await new PopulationEvaluator(evaluator).SummarizeAsync(Stream(), measures, period, keepSubjects: true, CancellationToken.None);
        var parallel = await new PopulationEvaluator(evaluator, workers).SummarizeAsync(Stream(), measures, period, keepSubjects: true, CancellationToken.None);

        var builder = new MeasureReportBuilder(TimeProvider.System);
        for (var i = 0; i < measures.Count; i++)
        {
            Assert.Equal(serial[i].PatientsEvaluated, parallel[i].PatientsEvaluated);
            Assert.Equal(Normalized(builder.Summary(serial[i])), Normalized(builder.Summary(parallel[i])));
            Assert.Equal(Normalized(builder.SubjectList(serial[i])), Normalized(builder.SubjectList(parallel[i])));
        }

        // Not vacuous: the demo population fills the populations of every measure.
        Assert.All(serial, s => Assert.True(s.Counts.InitialPopulation > 0, $"{s.Measure.Id}: empty initial population"));
    }

    [Fact]
    public async System.Threading.Tasks.Task SummarizeAsync_Progress_ReportsEveryPatientOnce()
    {
        IReadOnlyList<MeasureDefinition> measures = [.. RepositoryPaths.Repository.Measures];
        var period = new MeasurementPeriod(new DateOnly(2026, 1, 1), new DateOnly(2026, 12, 31));
        var seen = new System.Collections.Concurrent.ConcurrentBag<long>();
        var progress = new Recorder(seen);

        await new PopulationEvaluator(new MeasureEvaluator(RepositoryPaths.Repository), 4)
            .SummarizeAsync(Stream(), measures, period, keepSubjects: false, progress, Demo.Value.Count, CancellationToken.None);

        // Each patient is counted once: the reported counts are exactly 1..N.
        Assert.Equal(Enumerable.Range(1, Demo.Value.Count).Select(n => (long)n), seen.Order());
    }

    private static async IAsyncEnumerable<PatientFacts> Stream()
    {
        foreach (var patient in Demo.Value)
        {
            await System.Threading.Tasks.Task.Yield();
            yield return patient;
        }
    }

    /// <summary>The report as JSON without the parts that differ per run: id and date.</summary>
    private static string Normalized(MeasureReport report)
    {
        report.Id = null;
        report.DateElement = null;
        return FhirJson.Serialize(report);
    }

    private sealed class Recorder(System.Collections.Concurrent.ConcurrentBag<long> seen) : IProgress<EvaluationProgress>
    {
        public void Report(EvaluationProgress value) => seen.Add(value.Done);
    }
}
