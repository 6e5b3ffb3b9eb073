using MeasureEval.Core.Index;

namespace MeasureEval.Engine;

/// <summary>
/// One patient's facts with dates parsed once, shared by every measure evaluated for the patient in a pass.
/// </summary>
internal sealed class PreparedPatient
{
    private static readonly IReadOnlyList<PreparedRecord> NoRecords = [];
    private readonly Dictionary<string, List<PreparedRecord>> _byType = new(StringComparer.Ordinal);

    public PreparedPatient(PatientFacts facts)
    {
        Facts = facts;
        Reference = $"Patient/{facts.PatientId}";
        var demographics = facts.Demographics;
        if (demographics?.BirthDate is { } birth && StatedTime.TryParse(birth, out var stated))
        {
            BirthFirst = stated.First;
            BirthLast = stated.Last;
        }

        if (demographics?.DeceasedDateTime is { } death && StatedTime.TryParse(death, out var died))
        {
            Death = died;
        }

        foreach (var fact in facts.Facts)
        {
            if (!_byType.TryGetValue(fact.ResourceType, out var list))
            {
                list = [];
                _byType[fact.ResourceType] = list;
            }

            list.Add(new PreparedRecord(fact, this));
        }
    }

    public PatientFacts Facts { get; }

    public string Reference { get; }

    public Demographics? Demographics => Facts.Demographics;

    /// <summary>The birth date used (a partial birthDate's first day).</summary>
    public DateOnly? BirthFirst { get; }

    /// <summary>A partial birthDate's last day (equal to <see cref="BirthFirst"/> for a full date).</summary>
    public DateOnly? BirthLast { get; }

    public bool BirthPartial => BirthFirst != BirthLast;

    public StatedTime? Death { get; }

    /// <summary>deceasedBoolean true with no date: counts as died before any window start.</summary>
    public bool DiedUndated => Death is null && Demographics?.DeceasedBoolean == true;

    public IReadOnlyList<PreparedRecord> OfType(string resourceType) =>
        _byType.TryGetValue(resourceType, out var list) ? list : NoRecords;
}

/// <summary>A fact with its time elements parsed on first use.</summary>
internal sealed class PreparedRecord
{
    private readonly PreparedPatient _patient;
    private bool _parsed;
    private StatedTime? _point;
    private StatedTime? _periodStart;
    private StatedTime? _periodEnd;
    private bool _isPeriod;
    private DateOnly? _onsetFirst;
    private DateOnly? _abatementLast;
    private bool _abatementPresent;
    private DateOnly? _recordedFirst;

    public PreparedRecord(ClinicalFact fact, PreparedPatient patient)
    {
        Fact = fact;
        _patient = patient;
        Reference = $"{fact.ResourceType}/{fact.Id}";
    }

    public ClinicalFact Fact { get; }

    public string Reference { get; }

    /// <summary>The one stated time the record is judged and ranked by (a Period's end, or its start without an end); null when it has none usable.</summary>
    public StatedTime? Point
    {
        get
        {
            Parse();
            return _point;
        }
    }

    public bool IsPeriod
    {
        get
        {
            Parse();
            return _isPeriod;
        }
    }

    public StatedTime? PeriodStart
    {
        get
        {
            Parse();
            return _periodStart;
        }
    }

    public StatedTime? PeriodEnd
    {
        get
        {
            Parse();
            return _periodEnd;
        }
    }

    /// <summary>Condition onset (first day), from onset[x] or birthDate + onsetAge/onsetRange.low.</summary>
    public DateOnly? OnsetFirst
    {
        get
        {
            Parse();
            return _onsetFirst;
        }
    }

    /// <summary>Condition.recordedDate (first day).</summary>
    public DateOnly? RecordedFirst
    {
        get
        {
            Parse();
            return _recordedFirst;
        }
    }

    /// <summary>Condition abatement last day; null when absent or undated (see <see cref="AbatementPresent"/>).</summary>
    public DateOnly? AbatementLast
    {
        get
        {
            Parse();
            return _abatementLast;
        }
    }

    public bool AbatementPresent
    {
        get
        {
            Parse();
            return _abatementPresent;
        }
    }

    private void Parse()
    {
        if (_parsed)
        {
            return;
        }

        _parsed = true;
        var time = Fact.Time;
        var type = Fact.ResourceType;
        if (type == "Condition")
        {
            _onsetFirst = time switch
            {
                { Kind: TimeKind.DateTime } t => Stated(t.Start)?.First,
                { Kind: TimeKind.Period } t => Stated(t.Start)?.First,
                { Kind: TimeKind.Age } t => FromBirth(t.Low),
                { Kind: TimeKind.Range } t => FromBirth(t.Low),
                _ => null,
            };
            if (_onsetFirst is { } onset)
            {
                _point = new StatedTime(onset, onset, null);
            }

            _recordedFirst = Stated(Fact.RecordedDate)?.First;
            var abatement = Fact.Abatement;
            _abatementPresent = abatement is not null;
            _abatementLast = abatement switch
            {
                { Kind: TimeKind.DateTime } t => Stated(t.Start)?.Last,
                { Kind: TimeKind.Period } t => Stated(t.End)?.Last,
                { Kind: TimeKind.Age } t => FromBirth(t.Low),
                { Kind: TimeKind.Range } t => FromBirth(t.High),
                _ => null,
            };
            return;
        }

        switch (time?.Kind)
        {
            case TimeKind.DateTime when type != "Encounter":
            case TimeKind.Instant when type is "Observation" or "DiagnosticReport":
                _point = Stated(time.Start);
                break;
            case TimeKind.Period when type is "Observation" or "DiagnosticReport" or "Procedure" or "Encounter":
                _isPeriod = true;
                _periodStart = Stated(time.Start);
                _periodEnd = Stated(time.End);
                // Encounters rank by when they began; the other types are judged by the period's end.
                _point = type == "Encounter" ? _periodStart ?? _periodEnd : _periodEnd ?? _periodStart;
                break;
        }
    }

    private static StatedTime? Stated(string? text) => StatedTime.TryParse(text, out var t) ? t : null;

    private DateOnly? FromBirth(FactQuantity? age)
    {
        if (age?.Value is not { } value || _patient.BirthFirst is not { } birth || value < 0)
        {
            return null;
        }

        var whole = (int)decimal.Truncate(value);
        return age.Code switch
        {
            "a" => Calendar.AddMonths(birth, 12 * whole),
            "mo" => Calendar.AddMonths(birth, whole),
            "wk" => birth.AddDays(7 * whole),
            "d" => birth.AddDays(whole),
            _ => null,
        };
    }
}
