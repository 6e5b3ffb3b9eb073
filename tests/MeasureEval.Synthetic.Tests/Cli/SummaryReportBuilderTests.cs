using Hl7.Fhir.Model;
using MeasureEval.Cli.Batch;
using MeasureEval.Cli.Evaluate;
using MeasureEval.Engine;
using MeasureEval.Testing;

namespace MeasureEval.Synthetic.Tests.Cli;

public class SummaryReportBuilderTests
{
    private static readonly Lazy<IReadOnlyList<PopulationSummary>> Summaries = new(() =>
    {
        var (repository, facts) = BatchEvaluationTests.Demo.Value;
        return new BatchEvaluation(new MeasureEvaluator(repository), [.. repository.Measures], BatchEvaluationTests.Period)
            .RunAsync(facts.ToAsyncEnumerable(), null, null, CancellationToken.None).GetAwaiter().GetResult();
    });

    private static readonly DateTimeOffset GeneratedAt = new(2026, 12, 1, 12, 0, 0, TimeSpan.Zero);

    [Fact]
    public void Build_DemoPopulation_EveryReportValidAgainstBaseR4()
    {
        var errors = Summaries.Value.SelectMany(s => BaseR4Validator.Shared.Errors(SummaryReportBuilder.Build(s, GeneratedAt)).Select(e => $"{s.Measure.Id}: {e}")).ToList();
        Assert.Empty(errors);
    }

    [Fact]
    public void Build_DemoPopulation_ScoreIsNumeratorOverRateDenominator()
    {
        foreach (var summary in Summaries.Value)
        {
            var report = SummaryReportBuilder.Build(summary, GeneratedAt);
            var group = Assert.Single(report.Group);
            int Count(string code) => group.Population.Single(p => p.Code!.Coding[0].Code == code).Count!.Value;

            // FHIR proportion scoring: numerator / (denominator − exclusions − exceptions).
            var n = Count("denominator") - Count("denominator-exclusion") - Count("denominator-exception");
            Assert.True(n > 0, summary.Measure.Id);
            Assert.Equal(Math.Round((decimal)Count("numerator") / n, 6), group.MeasureScore!.Value);
        }
    }

    [Fact]
    public void Build_DemoPopulation_GenderStrataAddUpToTheInitialPopulation()
    {
        foreach (var summary in Summaries.Value)
        {
            var group = SummaryReportBuilder.Build(summary, GeneratedAt).Group[0];
            var ip = group.Population.Single(p => p.Code!.Coding[0].Code == "initial-population").Count;
            var gender = group.Stratifier.Single(s => s.Code[0]!.Text == "gender");
            Assert.Equal(ip, gender.Stratum.Sum(s => s.Population.Single(p => p.Code!.Coding[0].Code == "initial-population").Count));
        }
    }
}
