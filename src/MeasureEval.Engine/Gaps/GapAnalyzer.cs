using System.Globalization;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine.Gaps;

/// <summary>
/// Derives a patient's care gap on a measure from the measure's own numerator criteria: the status, the alternatives
/// that would close an open gap with their due-by dates (each retrieve's window end), the last relevant records, and —
/// by re-evaluating the numerator over the following periods — how long a closed gap stays closed.
/// Nothing here is written per measure.
/// </summary>
public sealed class GapAnalyzer(MeasureEvaluator evaluator, IRecordSource? records = null)
{
    /// <summary>How many following periods a closed gap is followed into (a 10-year colonoscopy window fits).</summary>
    public const int LookAheadPeriods = 20;

    public CareGap Analyze(MeasureDefinition measure, PatientFacts facts, MeasurementPeriod period, DateOnly? horizon = null) =>
        Analyze(measure, facts, period, evaluator.Evaluate(measure, facts, period), horizon);

    /// <summary>The gap for a result already evaluated for <paramref name="facts"/> over <paramref name="period"/>.</summary>
    public CareGap Analyze(MeasureDefinition measure, PatientFacts facts, MeasurementPeriod period, PatientResult result, DateOnly? horizon = null)
    {
        ArgumentNullException.ThrowIfNull(measure);
        ArgumentNullException.ThrowIfNull(facts);
        ArgumentNullException.ThrowIfNull(period);
        ArgumentNullException.ThrowIfNull(result);
        var judgedAgainst = horizon ?? Periods.Shift(period, 1).End;
        var panel = facts.Demographics?.GeneralPractitioner ?? "unattributed";
        var payer = Payer.Of(facts, period);
        var decrease = measure.ImprovementNotation == "decrease";
        if (!result.InRate || !measure.Populations.TryGetValue(PopulationKind.Numerator, out var numerator))
        {
            return new CareGap
            {
                PatientId = result.PatientId, MeasureId = measure.Id, Period = period, Status = GapStatus.NotApplicable,
                Horizon = judgedAgainst, Panel = panel, Payer = payer, Result = result,
            };
        }

        var patient = new PreparedPatient(facts);
        var evidence = Evidence(measure, patient, period, numerator, result);
        if (result.HasGap(measure.ImprovementNotation))
        {
            var (actions, allNeeded) = Actions(measure, patient, period, numerator, decrease);
            return new CareGap
            {
                PatientId = result.PatientId, MeasureId = measure.Id, Period = period, Status = GapStatus.Open, Horizon = judgedAgainst,
                Panel = panel, Payer = payer, Result = result, Actions = actions, ActionsAllNeeded = allNeeded,
                DueBy = actions.Max(a => a.DueBy), Evidence = evidence, Counts = result.Counts,
            };
        }

        // Closed today: follow the same records into the next periods until the numerator no longer gives the wanted result.
        DateOnly? countsThrough = null;
        MeasurementPeriod? fallsDue = null;
        for (var k = 1; k <= LookAheadPeriods; k++)
        {
            var next = Periods.Shift(period, k);
            if (Holds(measure, patient, next, numerator) == decrease)
            {
                countsThrough = Periods.Shift(period, k - 1).End;
                fallsDue = next;
                break;
            }
        }

        var prospective = countsThrough is { } through && through < judgedAgainst;
        var (keep, keepAll) = prospective ? Actions(measure, patient, fallsDue!, numerator, decrease) : ([], false);
        return new CareGap
        {
            PatientId = result.PatientId, MeasureId = measure.Id, Period = period, Status = prospective ? GapStatus.Prospective : GapStatus.Closed,
            Horizon = judgedAgainst, Panel = panel, Payer = payer, Result = result, Actions = keep, ActionsAllNeeded = keepAll,
            DueBy = keep.Count == 0 ? null : keep.Max(a => a.DueBy), Evidence = evidence, CountsThrough = countsThrough, Counts = result.Counts,
        };
    }

    private EvaluationState State(MeasureDefinition measure, PreparedPatient patient, MeasurementPeriod period, bool openWindowStart = false) =>
        new(patient, period, measure, new DefinitionCache(), records) { Chosen = [], OpenWindowStart = openWindowStart };

    private bool Holds(MeasureDefinition measure, PreparedPatient patient, MeasurementPeriod period, Criterion criterion) =>
        evaluator.Eval(criterion, State(measure, patient, period), Scope.Root);

    /// <summary>A definition reference stands for its body; the reference's label wins over the body's.</summary>
    private static Criterion Unwrap(Criterion criterion)
    {
        while (criterion is DefinitionCriterion { Target: { } target })
        {
            criterion = target.Body;
        }

        return criterion;
    }

    private static string? LabelOf(Criterion criterion)
    {
        while (true)
        {
            if (criterion.Label is { } label)
            {
                return label;
            }

            if (criterion is not DefinitionCriterion { Target: { } target })
            {
                return null;
            }

            criterion = target.Body;
        }
    }

    /// <summary>The numerator's alternatives: the items of its top-level any, or the numerator itself.</summary>
    private static IReadOnlyList<Criterion> Alternatives(Criterion numerator) =>
        Unwrap(numerator) is AnyCriterion any ? any.Items : [numerator];

    // ---- evidence ----

    private List<GapEvidence> Evidence(MeasureDefinition measure, PreparedPatient patient, MeasurementPeriod period, Criterion numerator, PatientResult result)
    {
        var items = new List<GapEvidence>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var alternative in Alternatives(numerator))
        {
            var state = State(measure, patient, period);
            var met = evaluator.Eval(alternative, state, Scope.Root);
            var counts = true;
            if (!met && state.Chosen!.Count == 0)
            {
                // Nothing in the window: look for the latest record of the kind outside it.
                state = State(measure, patient, period, openWindowStart: true);
                evaluator.Eval(alternative, state, Scope.Root);
                counts = false;
            }

            foreach (var (criterion, scope) in state.Chosen!)
            {
                if (Chosen(criterion, scope, counts) is { } chosen && chosen.References.All(seen.Add))
                {
                    items.Add(chosen);
                }
            }

            if (Latest(patient, state.Evidence, alternative) is { } latest && seen.Add(latest.Reference))
            {
                items.Add(new GapEvidence($"{NameOf(latest, alternative)} on {Day(latest.Point!.Value.First)}{(counts ? "" : " (outside the window, does not count)")}", latest.Point!.Value.First, [latest.Reference], counts));
            }
        }

        foreach (var count in result.Counts)
        {
            items.Add(new GapEvidence($"{count.Label}: {count.Counted} of {count.Required} {(count.Required == 1 ? "dose" : "doses")}", null, [], count.Missing == 0));
        }

        return items;
    }

    private static GapEvidence? Chosen(Criterion criterion, Scope scope, bool counts)
    {
        var suffix = counts ? "" : " (outside the window, does not count)";
        if (criterion is MostRecentCriterion mostRecent && scope.Record is { } record)
        {
            var name = Name(record.Source, mostRecent.Retrieve);
            var value = Texts.Quantity(record.Quantity, record.Value, mostRecent.Retrieve.Leaves().Select(l => l.ValueIn).FirstOrDefault(u => u is not null));
            return new GapEvidence($"latest {name}{(value is null ? "" : " " + value)} on {Day(record.Time.First)}{suffix}", record.Time.First, [record.Record.Reference], counts);
        }

        if (criterion is SameDayCriterion sameDay && scope.Named is { } named)
        {
            var values = sameDay.Values.Select(v => named[v.Name]).ToList();
            var numbers = string.Join("/", values.Select(v => Texts.Number(v.Quantity?.Value)));
            var units = values.Select(v => Texts.Unit(v.Quantity)).Distinct(StringComparer.Ordinal).ToList();
            var date = values[0].Time.First;
            var text = $"{string.Join("/", sameDay.Values.Select(v => v.Name))} {numbers}{(units.Count == 1 && units[0] is { Length: > 0 } u ? " " + u : "")} on {Day(date)}{suffix}";
            return new GapEvidence(text, date, [.. values.Select(v => v.Record.Reference).Distinct(StringComparer.Ordinal)], counts);
        }

        return null;
    }

    /// <summary>The latest clinical record among the evidence (patients and demographics left out).</summary>
    private static PreparedRecord? Latest(PreparedPatient patient, IEnumerable<string> references, Criterion alternative)
    {
        var leaves = RetrievesOf(alternative).SelectMany(r => r.Leaves()).ToList();
        PreparedRecord? best = null;
        foreach (var reference in references.Distinct(StringComparer.Ordinal))
        {
            var slash = reference.IndexOf('/', StringComparison.Ordinal);
            var type = reference[..slash];
            if (type == "Patient")
            {
                continue;
            }

            var record = patient.OfType(type).FirstOrDefault(r => r.Reference == reference);
            if (record?.Point is not { } point || !leaves.Any(l => l.ResourceType == type && (l.ValueSet is null || l.ValueSet.ContainsAny(record.Fact.Codes))))
            {
                continue;
            }

            if (best is null || StatedTime.CompareRank(point, best.Point!.Value) > 0)
            {
                best = record;
            }
        }

        return best;
    }

    private static string NameOf(PreparedRecord record, Criterion alternative)
    {
        var leaf = RetrievesOf(alternative).SelectMany(r => r.Leaves())
            .FirstOrDefault(l => l.ResourceType == record.Fact.ResourceType && (l.ValueSet is null || l.ValueSet.ContainsAny(record.Fact.Codes)));
        return leaf is null ? record.Fact.ResourceType : Name(leaf, leaf);
    }

    /// <summary>Every retrieve a criterion reads (through definitions, then-branches and sameDay values).</summary>
    private static IEnumerable<Retrieve> RetrievesOf(Criterion criterion) => Unwrap(criterion) switch
    {
        AllCriterion all => all.Items.SelectMany(RetrievesOf),
        AnyCriterion any => any.Items.SelectMany(RetrievesOf),
        NotCriterion not => RetrievesOf(not.Inner),
        ExistsCriterion e => [e.Retrieve],
        CountCriterion c => [c.Retrieve],
        MostRecentCriterion m => m.Then is null ? [m.Retrieve] : [m.Retrieve, .. RetrievesOf(m.Then)],
        SameDayCriterion s => s.Values.Select(v => v.Retrieve),
        _ => [],
    };

    // ---- actions ----

    private (IReadOnlyList<GapAction> Actions, bool AllNeeded) Actions(MeasureDefinition measure, PreparedPatient patient, MeasurementPeriod period, Criterion numerator, bool decrease)
    {
        var state = State(measure, patient, period);
        evaluator.Eval(numerator, state, Scope.Root);
        var body = Unwrap(numerator);
        var actions = new List<GapAction>();
        Collect(body, state, Scope.Root, decrease, actions, LabelOf(numerator));
        // A closing that needs every part (a dose series; an inverse measure's "no result" and "result too high" both undone).
        var allNeeded = body is AllCriterion || (decrease && body is AnyCriterion);
        if (decrease)
        {
            // Of actions on one value set, the one with a condition on the result says all the others say.
            actions = [.. actions.GroupBy(a => a.ValueSetUrl ?? a.Text, StringComparer.Ordinal).Select(g => g.OrderByDescending(a => a.Text.Length).First())];
        }

        return (actions, allNeeded);
    }

    private void Collect(Criterion criterion, EvaluationState state, Scope scope, bool negate, List<GapAction> actions, string? label)
    {
        label = criterion.Label ?? label;
        switch (criterion)
        {
            case DefinitionCriterion { Target: { } target }:
                Collect(target.Body, state, scope, negate, actions, criterion.Label ?? target.Body.Label ?? label);
                break;
            case AnyCriterion any:
                foreach (var item in any.Items)
                {
                    Collect(item, state, scope, negate, actions, null);
                }

                break;
            case AllCriterion all:
                foreach (var item in all.Items)
                {
                    // Only the parts not yet met need an action.
                    if (negate || !evaluator.Eval(item, Fresh(state), scope))
                    {
                        Collect(item, state, scope, negate, actions, null);
                    }
                }

                break;
            case NotCriterion not:
                Collect(not.Inner, state, scope, !negate, actions, null);
                break;
            case ExistsCriterion exists when !negate:
                actions.Add(Action(exists.Retrieve, label ?? Name(exists.Retrieve, exists.Retrieve), null, state, scope));
                break;
            case CountCriterion count when !negate:
            {
                var probe = Fresh(state);
                evaluator.Eval(count, probe, scope);
                var detail = probe.Counts.LastOrDefault();
                var missing = detail?.Missing ?? count.AtLeast;
                var what = count.Label ?? count.Retrieve.Label ?? Name(count.Retrieve, count.Retrieve);
                var text = $"{what}: {missing} more {(missing == 1 ? "dose" : "doses")} (counted {detail?.Counted ?? 0} of {count.AtLeast})";
                actions.Add(Action(count.Retrieve, text, null, state, scope) with { Missing = missing, What = what });
                break;
            }

            case MostRecentCriterion mostRecent:
            {
                var condition = mostRecent.Then is null ? null : Texts.Condition(mostRecent.Then, negate);
                var what = Name(mostRecent.Retrieve, mostRecent.Retrieve);
                actions.Add(Action(mostRecent.Retrieve, what, condition is null ? null : $"(result: {condition})", state, scope));
                // Record-anchored alternatives (a follow-up within days of the chosen result) can still close it.
                if (!negate && mostRecent.Then is not null && state.Chosen!.FirstOrDefault(c => ReferenceEquals(c.Criterion, mostRecent)) is { Scope.Record: not null } chosen)
                {
                    foreach (var inner in RecordAnchored(mostRecent.Then))
                    {
                        actions.Add(Action(inner.Retrieve, inner.Label ?? Name(inner.Retrieve, inner.Retrieve), $"(for the {Name(chosen.Scope.Record!.Source, mostRecent.Retrieve)} of {Day(chosen.Scope.Record!.Time.First)})", state, chosen.Scope));
                    }
                }

                break;
            }

            case SameDayCriterion sameDay:
            {
                var condition = sameDay.Then is null ? null : Texts.Condition(sameDay.Then, negate);
                var what = string.Join(" and ", sameDay.Values.Select(v => v.Name));
                var retrieve = sameDay.Values[0].Retrieve;
                var action = Action(retrieve, $"{what} on one day", condition is null ? null : $"(result: {condition})", state, scope);
                actions.Add(action with
                {
                    ResourceTypes = [.. sameDay.Values.SelectMany(v => v.Retrieve.Leaves()).Select(l => l.ResourceType).Distinct(StringComparer.Ordinal)],
                    Codes = [.. sameDay.Values.SelectMany(v => v.Retrieve.Leaves()).Where(l => l.ValueSet is not null).SelectMany(l => ValueSetInfo.Of(l.ValueSet!).Codes).Distinct()],
                });
                break;
            }
        }
    }

    private static IEnumerable<ExistsCriterion> RecordAnchored(Criterion criterion) => Unwrap(criterion) switch
    {
        AnyCriterion any => any.Items.SelectMany(RecordAnchored),
        AllCriterion all => all.Items.SelectMany(RecordAnchored),
        ExistsCriterion e when e.Retrieve.Leaves().Any(l => l.Window?.To?.Anchor == DateAnchor.Record) => [e],
        _ => [],
    };

    private EvaluationState Fresh(EvaluationState state) => new(state.Patient, state.Period, state.Measure, new DefinitionCache(), records) { Chosen = [] };

    private static GapAction Action(Retrieve retrieve, string what, string? condition, EvaluationState state, Scope scope)
    {
        var leaves = retrieve.Leaves().ToList();
        DateOnly? due = null;
        foreach (var leaf in leaves)
        {
            var to = leaf.Window?.To is { } expression ? MeasureEvaluator.Resolve(expression, state, scope) : state.Period.End;
            if (to is { } date && (due is null || date > due))
            {
                due = date;
            }
        }

        var valueSet = leaves.Select(l => l.ValueSet).FirstOrDefault(v => v is not null);
        var info = valueSet is null ? null : ValueSetInfo.Of(valueSet);
        var text = $"{what}{(due is { } d ? $" by {Day(d)}" : "")}{(condition is null ? "" : " " + condition)}";
        return new GapAction(text, what, [.. leaves.Select(l => l.ResourceType).Distinct(StringComparer.Ordinal)], info?.Url,
            [.. leaves.Where(l => l.ValueSet is not null).SelectMany(l => ValueSetInfo.Of(l.ValueSet!).Codes).Distinct()], due);
    }

    /// <summary>A retrieve's name: its label, its leaves' labels, or its value set's title.</summary>
    private static string Name(Retrieve retrieve, Retrieve fallback)
    {
        if (retrieve.Label is { } label)
        {
            return label;
        }

        var leaves = retrieve.Leaves().ToList();
        if (leaves.All(l => l.Label is not null))
        {
            return string.Join(" or ", leaves.Select(l => l.Label).Distinct(StringComparer.Ordinal));
        }

        var titles = leaves.Where(l => l.ValueSet is not null).Select(l => ValueSetInfo.Of(l.ValueSet!).Title).Distinct(StringComparer.Ordinal).ToList();
        return titles.Count > 0 ? string.Join(" or ", titles) : fallback.ResourceType;
    }

    private static string Day(DateOnly date) => date.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
}
