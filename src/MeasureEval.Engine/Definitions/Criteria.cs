using Hl7.FhirPath;

namespace MeasureEval.Engine;

/// <summary>A node of a measure's logic. <see cref="Path"/> is its JSON path in the definition file.</summary>
public abstract class Criterion
{
    protected Criterion(string path) => Path = path;

    public string Path { get; }

    public string? Label { get; init; }
}

public sealed class AllCriterion(string path, IReadOnlyList<Criterion> items) : Criterion(path)
{
    public IReadOnlyList<Criterion> Items { get; } = items;
}

public sealed class AnyCriterion(string path, IReadOnlyList<Criterion> items) : Criterion(path)
{
    public IReadOnlyList<Criterion> Items { get; } = items;
}

public sealed class NotCriterion(string path, Criterion inner) : Criterion(path)
{
    public Criterion Inner { get; } = inner;
}

public sealed class DefinitionCriterion(string path, string name) : Criterion(path)
{
    /// <summary>As written: "qualifying-encounter" or "common.qualifying-encounter".</summary>
    public string Name { get; } = name;

    /// <summary>Set when the repository resolves references.</summary>
    public NamedDefinition? Target { get; internal set; }
}

public sealed class AgeCriterion(string path, DateExpression on) : Criterion(path)
{
    public DateExpression On { get; } = on;

    public CalendarAmount? AtLeast { get; init; }

    public CalendarAmount? AtMost { get; init; }

    public CalendarAmount? Below { get; init; }
}

public sealed class GenderCriterion(string path, string gender) : Criterion(path)
{
    public string Gender { get; } = gender;
}

public sealed class BirthdayCriterion(string path, int years, DateWindow within) : Criterion(path)
{
    public int Years { get; } = years;

    public DateWindow Within { get; } = within;
}

public sealed class DeceasedCriterion(string path, DateWindow window, Timing timing) : Criterion(path)
{
    public DateWindow Window { get; } = window;

    public Timing Timing { get; } = timing;
}

public sealed class ExistsCriterion(string path, Retrieve retrieve) : Criterion(path)
{
    public Retrieve Retrieve { get; } = retrieve;
}

public sealed class CountCriterion(string path, Retrieve retrieve, bool distinctDates, int atLeast) : Criterion(path)
{
    public Retrieve Retrieve { get; } = retrieve;

    public bool DistinctDates { get; } = distinctDates;

    public int AtLeast { get; } = atLeast;
}

public enum TieBreak
{
    /// <summary>Earlier entries of the retrieve's anyOf win.</summary>
    Source,
    /// <summary>Later in time (date-only before timed; instants compared where both carry a time).</summary>
    Latest,
    LowestValue,
    HighestValue,
}

public sealed class MostRecentCriterion(string path, Retrieve retrieve, IReadOnlyList<TieBreak> tieBreak, Criterion? then) : Criterion(path)
{
    public Retrieve Retrieve { get; } = retrieve;

    public IReadOnlyList<TieBreak> TieBreak { get; } = tieBreak;

    public Criterion? Then { get; } = then;
}

public enum Pick
{
    Lowest,
    Highest,
}

public sealed record SameDayValue(string Name, Retrieve Retrieve, Pick Pick);

public sealed class SameDayCriterion(string path, IReadOnlyList<SameDayValue> values, Criterion? then) : Criterion(path)
{
    public IReadOnlyList<SameDayValue> Values { get; } = values;

    public Criterion? Then { get; } = then;
}

public enum Comparison
{
    LessThan,
    LessOrEqual,
    GreaterThan,
    GreaterOrEqual,
}

/// <summary>A threshold as written ("8 %", "140 mm[Hg]", "10"): a null or empty unit is the dimensionless unity.</summary>
public sealed record Threshold(decimal Value, string Unit);

public sealed class ValueCriterion(string path, Comparison comparison, Threshold threshold, string? of) : Criterion(path)
{
    public Comparison Comparison { get; } = comparison;

    public Threshold Threshold { get; } = threshold;

    /// <summary>Inside sameDay: the named value tested.</summary>
    public string? Of { get; } = of;
}

public sealed class FromCriterion(string path, string sourceLabel) : Criterion(path)
{
    public string SourceLabel { get; } = sourceLabel;
}

/// <summary>How a record's time relates to a window.</summary>
public enum Timing
{
    /// <summary>The whole stated interval inside the window.</summary>
    In,
    /// <summary>Any part of the stated interval (for Condition: onset to abatement) inside the window.</summary>
    Overlaps,
    /// <summary>Encounter period.start (or the record's time) in the window.</summary>
    StartsIn,
    /// <summary>Encounter period.end (or the record's time) in the window.</summary>
    EndsIn,
    /// <summary>First day of the onset/record time (recordedDate standing in for a missing Condition onset) ≤ window end.</summary>
    OnsetOnOrBefore,
    /// <summary>First day of the onset/record time &lt; window start (no recordedDate standing in: this is not an on-or-before test).</summary>
    OnsetBefore,
}

/// <summary>One retrieve: records of a type in a value set that count under the status rules and fall in the window.</summary>
public sealed class Retrieve
{
    public required string Path { get; init; }

    public string? Label { get; init; }

    /// <summary>When set, the retrieve pools these retrieves' records and the other keys are not used.</summary>
    public IReadOnlyList<Retrieve>? AnyOf { get; init; }

    public string ResourceType { get; init; } = "";

    public string? ValueSetId { get; init; }

    public ValueSetIndex? ValueSet { get; internal set; }

    /// <summary>Null: the type's default rule.</summary>
    public IReadOnlySet<string>? Status { get; init; }

    public IReadOnlySet<string>? EncounterClass { get; init; }

    public IReadOnlySet<string>? DischargeDisposition { get; init; }

    public IReadOnlySet<string>? StatusReason { get; init; }

    public IReadOnlySet<string>? DataAbsentReason { get; init; }

    public string? ComponentValueSetId { get; init; }

    public ValueSetIndex? ComponentValueSet { get; internal set; }

    public DateWindow? Window { get; init; }

    public Timing Timing { get; init; } = Timing.In;

    public bool IgnoreClinicalStatus { get; init; }

    public CalendarAmount? AssumedDuration { get; init; }

    /// <summary>Condition with an onset test: it must not have abated before this date (abatement, else the clinicalStatus rule).</summary>
    public DateExpression? NotAbatedBefore { get; init; }

    public CalendarAmount? AgeAtEventAtLeast { get; init; }

    /// <summary>A record counts only when its value converts to this unit ("" = unity).</summary>
    public string? ValueIn { get; init; }

    public IReadOnlyList<FhirPathFilter> Where { get; init; } = [];

    /// <summary>Retrieves that carry their own records: this one, or the leaves of anyOf.</summary>
    public IEnumerable<Retrieve> Leaves() => AnyOf is null ? [this] : AnyOf.SelectMany(r => r.Leaves());
}

public sealed record FhirPathFilter(string Expression, CompiledExpression Compiled);
