using Hl7.Fhir.Model;

namespace MeasureEval.Engine.Reports;

/// <summary>
/// Builds R4 MeasureReports. Everything but id and date follows from the data and the measure version, so the same
/// input gives the same report.
/// </summary>
public sealed class MeasureReportBuilder(TimeProvider time)
{
    public MeasureReport Individual(MeasureDefinition measure, MeasurementPeriod period, PatientResult result)
    {
        var report = Start(measure, period, MeasureReport.MeasureReportType.Individual);
        report.Subject = new ResourceReference($"Patient/{result.PatientId}");
        var group = new MeasureReport.GroupComponent();
        foreach (var population in PopulationsOf(measure))
        {
            var component = Population(population, result.Is(population) ? 1 : 0);
            if (result.EvaluatedResources.TryGetValue(population, out var resources))
            {
                foreach (var reference in resources)
                {
                    component.Extension.Add(new Extension(ReportExtensions.PopulationEvaluatedResource, new ResourceReference(reference)));
                }
            }

            if (result.MetDefinitions.TryGetValue(population, out var definitions))
            {
                foreach (var definition in definitions)
                {
                    component.Extension.Add(new Extension(ReportExtensions.PopulationDefinition, new FhirString(definition)));
                }
            }

            group.Population.Add(component);
        }

        report.Group.Add(group);
        foreach (var reference in result.EvaluatedResources.Values.SelectMany(r => r).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal))
        {
            report.EvaluatedResource.Add(new ResourceReference(reference));
        }

        foreach (var count in result.Counts)
        {
            report.Extension.Add(new Extension
            {
                Url = ReportExtensions.CountDetail,
                Extension =
                [
                    new Extension("label", new FhirString(count.Label)),
                    new Extension("counted", new Integer(count.Counted)),
                    new Extension("required", new Integer(count.Required)),
                    new Extension("missing", new Integer(count.Missing)),
                ],
            });
        }

        AddFindings(report, result.Findings.Select(f => (f.Code, f.Resource is null ? f.Message : $"{f.Resource}: {f.Message}")));
        return report;
    }

    public MeasureReport Summary(PopulationSummary summary) => Aggregate(summary, MeasureReport.MeasureReportType.Summary);

    /// <summary>A subject-list report: the summary's counts with a contained List of patients per population (needs subjects kept).</summary>
    public MeasureReport SubjectList(PopulationSummary summary) => Aggregate(summary, MeasureReport.MeasureReportType.SubjectList);

    private MeasureReport Aggregate(PopulationSummary summary, MeasureReport.MeasureReportType type)
    {
        var measure = summary.Measure;
        var report = Start(measure, summary.Period, type);
        var group = new MeasureReport.GroupComponent();
        foreach (var population in PopulationsOf(measure))
        {
            var component = Population(population, summary.Counts[population]);
            if (type == MeasureReport.MeasureReportType.SubjectList)
            {
                var subjects = summary.Subjects ?? throw new InvalidOperationException("a subject-list report needs a summary that kept its subjects");
                var listId = $"subjects-{population.Code()}";
                var list = new List
                {
                    Id = listId,
                    Status = List.ListStatus.Current,
                    Mode = ListMode.Snapshot,
                    Title = $"Patients in {population.Code()}",
                    Entry = [.. subjects[population].Order(StringComparer.Ordinal).Select(id => new List.EntryComponent { Item = new ResourceReference($"Patient/{id}") })],
                };
                report.Contained.Add(list);
                component.SubjectResults = new ResourceReference($"#{listId}");
            }

            group.Population.Add(component);
        }

        group.MeasureScore = Score(summary.Counts);
        foreach (var stratifier in measure.Stratifiers)
        {
            var component = new MeasureReport.StratifierComponent { Code = [StratifierCode(stratifier)] };
            foreach (var (code, counts) in summary.Strata[stratifier.Id])
            {
                var stratum = new MeasureReport.StratifierGroupComponent
                {
                    Value = new CodeableConcept { Text = code },
                    MeasureScore = Score(counts),
                };
                foreach (var population in PopulationsOf(measure))
                {
                    stratum.Population.Add(new MeasureReport.StratifierGroupPopulationComponent { Code = PopulationCode(population), Count = counts[population] });
                }

                component.Stratum.Add(stratum);
            }

            group.Stratifier.Add(component);
        }

        report.Group.Add(group);
        AddFindings(report, summary.FindingCounts.Select(f => (f.Key, $"{f.Value} finding(s) among {summary.PatientsEvaluated} patient(s) evaluated")));
        return report;
    }

    private MeasureReport Start(MeasureDefinition measure, MeasurementPeriod period, MeasureReport.MeasureReportType type) => new()
    {
        Id = Guid.NewGuid().ToString("N"),
        Status = MeasureReport.MeasureReportStatus.Complete,
        Type = type,
        Measure = measure.CanonicalReference,
        Date = time.GetUtcNow().ToString("yyyy-MM-ddTHH:mm:ssK", System.Globalization.CultureInfo.InvariantCulture),
        Period = new Period(new FhirDateTime(period.Start.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture)), new FhirDateTime(period.End.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture))),
        ImprovementNotation = new CodeableConcept(ReportExtensions.ImprovementNotationSystem, measure.ImprovementNotation),
    };

    /// <summary>The populations a measure defines; the denominator is always reported (it defaults to the initial population).</summary>
    internal static IEnumerable<PopulationKind> PopulationsOf(MeasureDefinition measure) =>
        PopulationKinds.All.Where(p => p is PopulationKind.InitialPopulation or PopulationKind.Denominator or PopulationKind.Numerator || measure.Populations.ContainsKey(p));

    internal static CodeableConcept PopulationCode(PopulationKind population) => new(ReportExtensions.MeasurePopulationSystem, population.Code());

    internal static CodeableConcept StratifierCode(StratifierDefinition stratifier) =>
        new(ReportExtensions.StratifierCodeSystem, stratifier.Id) { Text = stratifier.Description ?? stratifier.Id };

    private static MeasureReport.PopulationComponent Population(PopulationKind population, int count) => new() { Code = PopulationCode(population), Count = count };

    private static Quantity? Score(PopulationTally counts)
    {
        if (counts.Score is not { } score)
        {
            return null;
        }

        var quantity = new Quantity { Value = (decimal)score };
        if (counts.Interval is { } interval)
        {
            quantity.Extension.Add(new Extension
            {
                Url = ReportExtensions.ScoreInterval,
                Extension =
                [
                    new Extension("lower", new FhirDecimal((decimal)interval.Lower)),
                    new Extension("upper", new FhirDecimal((decimal)interval.Upper)),
                    new Extension("confidence", new FhirDecimal(0.95m)),
                    new Extension("method", new Code("wilson")),
                ],
            });
        }

        return quantity;
    }

    private static void AddFindings(MeasureReport report, IEnumerable<(string Code, string Text)> findings)
    {
        var outcome = new OperationOutcome { Id = "data-quality" };
        foreach (var (code, text) in findings)
        {
            outcome.Issue.Add(new OperationOutcome.IssueComponent
            {
                Severity = OperationOutcome.IssueSeverity.Warning,
                Code = OperationOutcome.IssueType.Informational,
                Details = new CodeableConcept(ReportExtensions.DataQualityCodeSystem, code) { Text = text },
            });
        }

        if (outcome.Issue.Count == 0)
        {
            return;
        }

        report.Contained.Add(outcome);
        report.Extension.Add(new Extension(ReportExtensions.DataQuality, new ResourceReference("#data-quality")));
    }
}
