namespace MeasureEval.Engine;

/// <summary>Stable codes of data-quality findings (reported, never fatal).</summary>
public static class FindingCodes
{
    /// <summary>A record of a value set a measure reads has no element the engine may take its time from.</summary>
    public const string NoUsableTime = "no-usable-time";

    /// <summary>A value in a unit that cannot be converted to the unit compared in.</summary>
    public const string UnconvertibleUnit = "unconvertible-unit";

    /// <summary>A value the measure compares is not a quantity (a string, a code) or has no number.</summary>
    public const string ValueNotQuantity = "value-not-quantity";

    /// <summary>A quantity comparator the engine cannot judge ("ad").</summary>
    public const string UnjudgedComparator = "unjudged-comparator";

    /// <summary>A Condition inactive, in remission or resolved without an abatement date.</summary>
    public const string ConditionNoEndDate = "condition-no-end-date";

    /// <summary>A Condition abatement that carries no date (abatementBoolean, abatementString).</summary>
    public const string ConditionUndatedAbatement = "condition-undated-abatement";

    /// <summary>The patient has no birthDate: in no initial population.</summary>
    public const string MissingBirthDate = "missing-birth-date";

    /// <summary>A partial birthDate (year or month) was taken at its first day and that made an age test uncertain.</summary>
    public const string PartialBirthDate = "partial-birth-date";

    /// <summary>A FHIRPath filter could not be evaluated because the resource itself was not available.</summary>
    public const string ResourceUnavailable = "resource-unavailable";

    /// <summary>Only resources pointing at the patient are stored, not the Patient resource.</summary>
    public const string MissingPatient = "missing-patient";
}

/// <summary>A data-quality observation about one patient's records. <see cref="Resource"/> is "Type/id" or null for the patient as a whole.</summary>
public sealed record DataQualityFinding(string Code, string Message, string? Resource);

/// <summary>How many counting records a count criterion found against what it needs (doses given and missing per antigen).</summary>
public sealed record CountDetail(string Label, int Counted, int Required)
{
    public int Missing => Math.Max(0, Required - Counted);
}

/// <summary>The outcome of one measure for one patient.</summary>
public sealed class PatientResult
{
    public required string PatientId { get; init; }

    public required string MeasureId { get; init; }

    public bool InitialPopulation { get; init; }

    public bool Denominator { get; init; }

    public bool DenominatorExclusion { get; init; }

    public bool DenominatorException { get; init; }

    public bool Numerator { get; init; }

    public IReadOnlyList<DataQualityFinding> Findings { get; init; } = [];

    /// <summary>Per population: the resources ("Type/id") that decided it, in the order they were met.</summary>
    public IReadOnlyDictionary<PopulationKind, IReadOnlyList<string>> EvaluatedResources { get; init; } = new Dictionary<PopulationKind, IReadOnlyList<string>>();

    /// <summary>Per population: the named definitions that held on the way to its result.</summary>
    public IReadOnlyDictionary<PopulationKind, IReadOnlyList<string>> MetDefinitions { get; init; } = new Dictionary<PopulationKind, IReadOnlyList<string>>();

    /// <summary>Stratifier id → stratum code, for initial-population members only.</summary>
    public IReadOnlyDictionary<string, string> Strata { get; init; } = new Dictionary<string, string>();

    /// <summary>Every count criterion with a label that was evaluated (the gap report: counted vs required).</summary>
    public IReadOnlyList<CountDetail> Counts { get; init; } = [];

    public bool Is(PopulationKind population) => population switch
    {
        PopulationKind.InitialPopulation => InitialPopulation,
        PopulationKind.Denominator => Denominator,
        PopulationKind.DenominatorExclusion => DenominatorExclusion,
        PopulationKind.DenominatorException => DenominatorException,
        _ => Numerator,
    };

    /// <summary>In the denominator, not excluded, not excepted: the patient counts in the rate.</summary>
    public bool InRate => Denominator && !DenominatorExclusion && !DenominatorException;

    /// <summary>
    /// A care gap: a rated patient whose result is the one the measure wants to improve — not in the numerator for an
    /// increase measure, in the numerator for a decrease (inverse) measure.
    /// </summary>
    public bool HasGap(string improvementNotation) => InRate && (improvementNotation == "decrease" ? Numerator : !Numerator);
}
