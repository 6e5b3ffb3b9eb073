using Hl7.Fhir.Model;

namespace MeasureEval.Engine.Reports;

/// <summary>
/// FHIR projections of loaded definitions: a Measure whose criteria name the logic, and a Library carrying the definition
/// file byte for byte, so that a reader sees exactly what was computed.
/// </summary>
public static class MeasureResources
{
    public const string Disclaimer = "Results support quality reporting and care management; clinical decisions stay with licensed clinicians and local rules.";

    public static string LibraryUrl(string name) => $"https://measureeval.example.org/fhir/Library/{name}";

    public static Measure ToMeasure(MeasureDefinition measure)
    {
        var resource = new Measure
        {
            Id = measure.Id,
            Url = measure.Url,
            Version = measure.Version,
            Name = measure.Name,
            Title = measure.Title,
            Status = PublicationStatus.Active,
            Description = measure.Description is null ? null : new Markdown(measure.Description),
            Disclaimer = new Markdown(Disclaimer),
            Scoring = new CodeableConcept(ReportExtensions.MeasureScoringSystem, measure.Scoring),
            ImprovementNotation = new CodeableConcept(ReportExtensions.ImprovementNotationSystem, measure.ImprovementNotation),
            Library = [$"{LibraryUrl(measure.Id)}|{measure.Version}", .. measure.Libraries.Select(l => LibraryUrl(l))],
        };
        foreach (var source in measure.Sources)
        {
            resource.RelatedArtifact.Add(new RelatedArtifact { Type = RelatedArtifact.RelatedArtifactType.Citation, Citation = new Markdown(source) });
        }

        var group = new Measure.GroupComponent();
        foreach (var population in MeasureReportBuilder.PopulationsOf(measure))
        {
            group.Population.Add(new Measure.PopulationComponent
            {
                Code = MeasureReportBuilder.PopulationCode(population),
                Criteria = Criteria(measure.Populations.TryGetValue(population, out var criterion) ? ExpressionOf(criterion, $"populations.{population.Code()}") : "populations.initial-population"),
            });
        }

        foreach (var stratifier in measure.Stratifiers)
        {
            group.Stratifier.Add(new Measure.StratifierComponent
            {
                Code = MeasureReportBuilder.StratifierCode(stratifier),
                Criteria = Criteria($"stratifiers.{stratifier.Id}"),
            });
        }

        resource.Group.Add(group);
        foreach (var stratifier in measure.Stratifiers.Where(s => s.Kind is StratifierKind.Gender or StratifierKind.Payer))
        {
            resource.SupplementalData.Add(new Measure.SupplementalDataComponent
            {
                Code = new CodeableConcept(ReportExtensions.StratifierCodeSystem, stratifier.Id),
                Usage = [new CodeableConcept("http://terminology.hl7.org/CodeSystem/measure-data-usage", "supplemental-data")],
                Criteria = Criteria($"stratifiers.{stratifier.Id}"),
            });
        }

        return resource;
    }

    public static Library ToLibrary(MeasureDefinition measure) =>
        Library(measure.Id, measure.Url is null ? null : measure.Name, measure.Version, measure.Title, measure.Content);

    public static Library ToLibrary(LibraryDefinition library) =>
        Library(library.Name, library.Name, library.Version, $"Shared definitions '{library.Name}'", library.Content);

    private static Library Library(string id, string? name, string version, string? title, byte[] content) => new()
    {
        Id = id,
        Url = LibraryUrl(id),
        Version = version,
        Name = name is null ? null : new string([.. name.Where(char.IsLetterOrDigit)]),
        Title = title,
        Status = PublicationStatus.Active,
        Type = new CodeableConcept("http://terminology.hl7.org/CodeSystem/library-type", "logic-library"),
        Content = [new Attachment { ContentType = ReportExtensions.DefinitionMediaType, Data = content, Title = $"{id} definition ({ReportExtensions.DefinitionMediaType})" }],
    };

    /// <summary>A population that is just a named definition points at that name; an inline criterion at its place in the file.</summary>
    private static string ExpressionOf(Criterion criterion, string fallback) =>
        criterion is DefinitionCriterion d ? d.Target?.QualifiedName ?? d.Name : fallback;

    private static Expression Criteria(string expression) => new() { Language = ReportExtensions.DefinitionMediaType, Expression_ = expression };
}
