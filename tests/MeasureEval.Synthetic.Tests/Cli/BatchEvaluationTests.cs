using MeasureEval.Cli.Batch;
using MeasureEval.Core.Index;
using MeasureEval.Engine;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Tests.Cli;

public class BatchEvaluationTests
{
    internal static readonly Lazy<(MeasureRepository Repository, IReadOnlyList<PatientFacts> Facts)> Demo = new(() =>
    {
        var repository = MeasureRepository.Load(Path.Combine(RepositoryRoot.Path, "measures"), out var issues);
        Assert.Empty(issues);
        var inputIssues = new List<InputIssue>();
        var facts = InputFacts.Load(Path.Combine(RepositoryRoot.Path, DemoPopulation.RelativeDirectory), inputIssues);
        Assert.Empty(inputIssues);
        return (repository, facts);
    });

    internal static MeasurementPeriod Period => MeasurementPeriod.CalendarYear(2026);

    [Fact]
    public async Task RunAsync_DemoPopulation_SameCountsAsTheEnginesSequentialPass()
    {
        var (repository, facts) = Demo.Value;
        var measures = repository.Measures.ToList();
        var evaluator = new MeasureEvaluator(repository);
        var parallel = await new BatchEvaluation(evaluator, measures, Period).RunAsync(facts.ToAsyncEnumerable(), null, null, CancellationToken.None);
        var sequential = await new PopulationEvaluator(evaluator).SummarizeAsync(facts.ToAsyncEnumerable(), measures, Period, keepSubjects: false, CancellationToken.None);
        Assert.Equal(sequential.Count, parallel.Count);
        for (var i = 0; i < sequential.Count; i++)
        {
            Assert.Equal(facts.Count, parallel[i].PatientsEvaluated);
            Assert.All(PopulationKinds.All, kind => Assert.Equal(sequential[i].Counts[kind], parallel[i].Counts[kind]));
        }
    }

    [Fact]
    public async Task RunAsync_PerPatientCallback_SeesPatientsInStreamOrder()
    {
        var (repository, facts) = Demo.Value;
        var seen = new List<string>();
        await new BatchEvaluation(new MeasureEvaluator(repository), [.. repository.Measures], Period)
            .RunAsync(facts.ToAsyncEnumerable(), results => seen.Add(results[0].PatientId), null, CancellationToken.None);
        Assert.Equal(facts.Select(f => f.PatientId), seen);
    }
}
