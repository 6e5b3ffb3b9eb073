namespace MeasureEval.Engine.Reports;

/// <summary>The extensions and code systems of ours that reports and Measure resources carry.</summary>
public static class ReportExtensions
{
    public const string Base = "https://measureeval.example.org/fhir/StructureDefinition/";

    /// <summary>On MeasureReport.group.population (valueString, repeating): a named definition that held for the population.</summary>
    public const string PopulationDefinition = Base + "population-definition";

    /// <summary>On MeasureReport.group.population (valueReference, repeating): a resource that decided the population.</summary>
    public const string PopulationEvaluatedResource = Base + "population-evaluated-resource";

    /// <summary>On MeasureReport (valueReference to a contained OperationOutcome): the data-quality findings.</summary>
    public const string DataQuality = Base + "data-quality";

    /// <summary>On MeasureReport.group.measureScore and stratum.measureScore (complex: lower, upper, confidence, method): the Wilson score interval.</summary>
    public const string ScoreInterval = Base + "score-interval";

    /// <summary>On an individual MeasureReport (complex: label, counted, required, missing): doses or records counted against what the measure needs.</summary>
    public const string CountDetail = Base + "count-detail";

    /// <summary>Code system of data-quality finding codes (see <see cref="FindingCodes"/>).</summary>
    public const string DataQualityCodeSystem = "https://measureeval.example.org/fhir/CodeSystem/data-quality";

    /// <summary>Code system of stratifier ids and stratum codes of our definitions.</summary>
    public const string StratifierCodeSystem = "https://measureeval.example.org/fhir/CodeSystem/stratifier";

    public const string MeasurePopulationSystem = "http://terminology.hl7.org/CodeSystem/measure-population";

    public const string ImprovementNotationSystem = "http://terminology.hl7.org/CodeSystem/measure-improvement-notation";

    public const string MeasureScoringSystem = "http://terminology.hl7.org/CodeSystem/measure-scoring";

    /// <summary>The media type of our definition files.</summary>
    public const string DefinitionMediaType = "application/vnd.measureeval+json";
}
