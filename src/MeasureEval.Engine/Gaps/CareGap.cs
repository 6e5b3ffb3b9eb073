namespace MeasureEval.Engine.Gaps;

/// <summary>A code an action may be recorded with (one of the value set's codes).</summary>
public sealed record GapCode(string System, string Code);

/// <summary>
/// One thing that would close (or, for a prospective gap, keep closed) the gap: what, recorded with which codes, by when.
/// <see cref="Missing"/> is set for count criteria (doses still missing).
/// </summary>
public sealed record GapAction(string Text, string What, IReadOnlyList<string> ResourceTypes, string? ValueSetUrl, IReadOnlyList<GapCode> Codes, DateOnly? DueBy)
{
    public int? Missing { get; init; }
}

/// <summary>
/// A record that bears on the gap: the latest of its kind, its value where it has one, and whether it counts in the
/// period (false: it was found only outside the window, e.g. a colonoscopy too old to count).
/// </summary>
public sealed record GapEvidence(string Text, DateOnly? Date, IReadOnlyList<string> References, bool Counts);

/// <summary>The gap report of one patient on one measure.</summary>
public sealed class CareGap
{
    public required string PatientId { get; init; }

    public required string MeasureId { get; init; }

    public required MeasurementPeriod Period { get; init; }

    public required GapStatus Status { get; init; }

    /// <summary>The horizon a closed gap was judged against (prospective when the closing event stops counting before it).</summary>
    public required DateOnly Horizon { get; init; }

    /// <summary>Primary-care panel ("Practitioner/x" or "unattributed").</summary>
    public required string Panel { get; init; }

    /// <summary>Payer ("Organization/x", "self-pay" or "none").</summary>
    public required string Payer { get; init; }

    /// <summary>Open: what closes it. Prospective: what keeps it closed in the period it falls due again. Empty otherwise.</summary>
    public IReadOnlyList<GapAction> Actions { get; init; } = [];

    /// <summary>True when every action is needed (a series of doses); false when any one of them is enough.</summary>
    public bool ActionsAllNeeded { get; init; }

    /// <summary>The last date by which an action must happen to count (the latest due-by of the actions).</summary>
    public DateOnly? DueBy { get; init; }

    public IReadOnlyList<GapEvidence> Evidence { get; init; } = [];

    /// <summary>Closed or prospective: the last day of the last period in which the closing evidence still counts; null when it never stops counting within the look-ahead.</summary>
    public DateOnly? CountsThrough { get; init; }

    /// <summary>Closed or prospective: the day from which the measure falls due again.</summary>
    public DateOnly? DueAgainFrom => CountsThrough?.AddDays(1);

    /// <summary>Doses (or records) counted against what the measure needs, per label.</summary>
    public IReadOnlyList<CountDetail> Counts { get; init; } = [];

    /// <summary>Plain words: "FIT by 2026-12-31, or colonoscopy by 2026-12-31".</summary>
    public string ActionText => string.Join(ActionsAllNeeded ? "; and " : ", or ", Actions.Select(a => a.Text));

    public string EvidenceText => Evidence.Count == 0 ? "no relevant record" : string.Join("; ", Evidence.Select(e => e.Text));

    /// <summary>The patient's result the gap was derived from (for the individual MeasureReport).</summary>
    public required PatientResult Result { get; init; }
}
