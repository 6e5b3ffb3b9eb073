namespace MeasureEval.Engine;

/// <summary>The measurement period, both dates inclusive.</summary>
public sealed record MeasurementPeriod(DateOnly Start, DateOnly End)
{
    /// <summary>The calendar year, the default period.</summary>
    public static MeasurementPeriod CalendarYear(int year) => new(new DateOnly(year, 1, 1), new DateOnly(year, 12, 31));
}

/// <summary>A located problem in a definition file. <see cref="Path"/> is a JSON path such as <c>$.populations.numerator.any[2]</c>.</summary>
public sealed record DefinitionIssue(string File, string Path, string Message);

/// <summary>The FHIR measure populations, in evaluation order.</summary>
public enum PopulationKind
{
    InitialPopulation,
    Denominator,
    DenominatorExclusion,
    DenominatorException,
    Numerator,
}

public static class PopulationKinds
{
    public static IReadOnlyList<PopulationKind> All { get; } =
        [PopulationKind.InitialPopulation, PopulationKind.Denominator, PopulationKind.DenominatorExclusion, PopulationKind.DenominatorException, PopulationKind.Numerator];

    /// <summary>The code in http://terminology.hl7.org/CodeSystem/measure-population, also the key in definition files.</summary>
    public static string Code(this PopulationKind kind) => kind switch
    {
        PopulationKind.InitialPopulation => "initial-population",
        PopulationKind.Denominator => "denominator",
        PopulationKind.DenominatorExclusion => "denominator-exclusion",
        PopulationKind.DenominatorException => "denominator-exception",
        PopulationKind.Numerator => "numerator",
        _ => throw new ArgumentOutOfRangeException(nameof(kind)),
    };

    public static bool TryParse(string code, out PopulationKind kind)
    {
        foreach (var k in All)
        {
            if (k.Code() == code)
            {
                kind = k;
                return true;
            }
        }

        kind = default;
        return false;
    }
}

/// <summary>A named criterion of a measure or library.</summary>
public sealed class NamedDefinition(string owner, string name, Criterion body, string path)
{
    /// <summary>The measure id or library name that defines it.</summary>
    public string Owner { get; } = owner;

    public string Name { get; } = name;

    /// <summary>"common.qualifying-encounter" for a library definition, the bare name for a measure's own.</summary>
    public string QualifiedName { get; internal set; } = name;

    public Criterion Body { get; } = body;

    public string Path { get; } = path;
}

/// <summary>A conversion UCUM must not make (HbA1c IFCC mmol/mol → NGSP %): to = from × multiply + add.</summary>
public sealed record UnitConversion(string From, string To, decimal Multiply, decimal Add, string Source);

public enum StratifierKind
{
    AgeBand,
    Gender,
    Payer,
    Panel,
}

/// <summary>An age band in whole years, both bounds inclusive; a null bound is open.</summary>
public sealed record AgeBand(string Code, int? Low, int? High);

public sealed record StratifierDefinition(string Id, StratifierKind Kind, string? Description)
{
    public DateExpression? AgeOn { get; init; }

    public IReadOnlyList<AgeBand> Bands { get; init; } = [];
}

/// <summary>A loaded, validated measure with every reference resolved.</summary>
public sealed class MeasureDefinition
{
    public required string Id { get; init; }

    public required string Url { get; init; }

    public required string Version { get; init; }

    public required string Name { get; init; }

    public string? Title { get; init; }

    public string? Description { get; init; }

    public string Scoring { get; init; } = "proportion";

    /// <summary>"increase" or "decrease".</summary>
    public required string ImprovementNotation { get; init; }

    public IReadOnlyDictionary<PopulationKind, Criterion> Populations { get; init; } = new Dictionary<PopulationKind, Criterion>();

    public IReadOnlyDictionary<string, NamedDefinition> Definitions { get; init; } = new Dictionary<string, NamedDefinition>();

    public IReadOnlyList<StratifierDefinition> Stratifiers { get; init; } = [];

    public IReadOnlyList<string> Sources { get; init; } = [];

    /// <summary>Conversions declared by the measure and the libraries it uses.</summary>
    public IReadOnlyList<UnitConversion> UnitConversions { get; init; } = [];

    /// <summary>Library names this measure uses, directly or through other libraries.</summary>
    public IReadOnlyList<string> Libraries { get; init; } = [];

    /// <summary>The definition file exactly as read, so that a report's reader sees what was computed.</summary>
    public required byte[] Content { get; init; }

    public required string FileName { get; init; }

    /// <summary>Canonical reference written into reports: url|version.</summary>
    public string CanonicalReference => $"{Url}|{Version}";

    /// <summary>Value set ids this measure reads, for the Measure projection.</summary>
    public IReadOnlyList<string> ValueSetIds { get; init; } = [];
}

/// <summary>A loaded definition library.</summary>
public sealed class LibraryDefinition
{
    public required string Name { get; init; }

    public required string Version { get; init; }

    public string? Url { get; init; }

    public IReadOnlyList<string> Uses { get; init; } = [];

    public IReadOnlyList<UnitConversion> UnitConversions { get; init; } = [];

    public IReadOnlyDictionary<string, NamedDefinition> Definitions { get; init; } = new Dictionary<string, NamedDefinition>();

    public required byte[] Content { get; init; }

    public required string FileName { get; init; }
}
