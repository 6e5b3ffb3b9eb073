using Hl7.Fhir.Model;
using MeasureEval.Engine;

namespace MeasureEval.Cli.Evaluate;

/// <summary>
/// A FHIR R4 summary MeasureReport from one measure's aggregate: the five population counts, the score
/// (numerator / (denominator − exclusions − exceptions), left out when that is 0), the 95 % Wilson interval as an
/// extension, and every stratum of every stratifier with its own counts and score.
/// </summary>
internal static class SummaryReportBuilder
{
    public const string PopulationSystem = "http://terminology.hl7.org/CodeSystem/measure-population";
    public const string ImprovementSystem = "http://terminology.hl7.org/CodeSystem/measure-improvement-notation";
    public const string IntervalExtension = "https://measureeval.example.org/fhir/StructureDefinition/rate-interval-95";

    public static MeasureReport Build(PopulationSummary summary, DateTimeOffset generatedAt)
    {
        ArgumentNullException.ThrowIfNull(summary);
        var measure = summary.Measure;
        var group = new MeasureReport.GroupComponent
        {
            Population = [.. PopulationKinds.All.Select(kind => new MeasureReport.PopulationComponent
            {
                Code = new CodeableConcept(PopulationSystem, kind.Code()),
                Count = summary.Counts[kind],
            })],
            MeasureScore = Score(summary.Counts),
            Stratifier = [.. measure.Stratifiers.Select(s => new MeasureReport.StratifierComponent
            {
                Code = [new CodeableConcept { Text = s.Id }],
                Stratum = [.. (summary.Strata.TryGetValue(s.Id, out var strata) ? strata : []).Select(stratum => new MeasureReport.StratifierGroupComponent
                {
                    Value = new CodeableConcept { Text = stratum.Key },
                    Population = [.. PopulationKinds.All.Select(kind => new MeasureReport.StratifierGroupPopulationComponent
                    {
                        Code = new CodeableConcept(PopulationSystem, kind.Code()),
                        Count = stratum.Value[kind],
                    })],
                    MeasureScore = Score(stratum.Value),
                })],
            })],
        };
        if (summary.Counts.Interval is { } interval)
        {
            group.Extension.Add(new Extension(IntervalExtension, new Hl7.Fhir.Model.Range
            {
                Low = new Quantity { Value = Round(interval.Lower) },
                High = new Quantity { Value = Round(interval.Upper) },
            }));
        }

        return new MeasureReport
        {
            Status = MeasureReport.MeasureReportStatus.Complete,
            Type = MeasureReport.MeasureReportType.Summary,
            Measure = measure.CanonicalReference,
            Date = generatedAt.ToString("yyyy-MM-ddTHH:mm:sszzz", System.Globalization.CultureInfo.InvariantCulture),
            Period = new Period
            {
                Start = summary.Period.Start.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture),
                End = summary.Period.End.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture),
            },
            ImprovementNotation = new CodeableConcept(ImprovementSystem, measure.ImprovementNotation),
            Group = [group],
        };
    }

    private static Quantity? Score(PopulationCounts counts) => counts.Score is { } score ? new Quantity { Value = Round(score) } : null;

    /// <summary>Six decimals: rates are reported, not recomputed, from these figures; counts stay exact.</summary>
    private static decimal Round(double value) => Math.Round((decimal)value, 6, MidpointRounding.AwayFromZero);
}
