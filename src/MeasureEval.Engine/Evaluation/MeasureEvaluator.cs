using Hl7.Fhir.FhirPath;
using Hl7.FhirPath;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine;

/// <summary>
/// Evaluates measures for one patient at a time. Thread-safe: all per-patient state lives in the call.
/// </summary>
public sealed class MeasureEvaluator
{
    private static readonly HashSet<string> ObservationStatuses = new(StringComparer.Ordinal) { "final", "amended", "corrected" };
    private static readonly HashSet<string> ReportStatuses = new(StringComparer.Ordinal) { "final", "amended", "corrected", "appended" };
    private static readonly HashSet<string> Completed = new(StringComparer.Ordinal) { "completed" };
    private static readonly HashSet<string> Finished = new(StringComparer.Ordinal) { "finished" };
    private static readonly HashSet<string> ActiveOrCompleted = new(StringComparer.Ordinal) { "active", "completed" };
    private static readonly HashSet<string> OrderIntents = new(StringComparer.Ordinal) { "order", "original-order", "reflex-order", "filler-order", "instance-order", "plan" };
    private static readonly HashSet<string> OngoingClinical = new(StringComparer.Ordinal) { "active", "recurrence", "relapse" };

    private static readonly IReadOnlyDictionary<string, string> NoStrata = new Dictionary<string, string>();

    private readonly IRecordSource? _records;

    public MeasureEvaluator(MeasureRepository repository, IRecordSource? records = null)
    {
        Repository = repository;
        _records = records;
    }

    public MeasureRepository Repository { get; }

    public PatientResult Evaluate(MeasureDefinition measure, PatientFacts patient, MeasurementPeriod period) =>
        EvaluateAll([measure], patient, period)[0];

    /// <summary>Evaluates several measures for one patient, parsing the patient's dates and shared definitions once.</summary>
    public IReadOnlyList<PatientResult> EvaluateAll(IReadOnlyList<MeasureDefinition> measures, PatientFacts patient, MeasurementPeriod period)
    {
        ArgumentNullException.ThrowIfNull(measures);
        ArgumentNullException.ThrowIfNull(patient);
        ArgumentNullException.ThrowIfNull(period);
        var prepared = new PreparedPatient(patient);
        var cache = new DefinitionCache();
        var results = new PatientResult[measures.Count];
        for (var i = 0; i < measures.Count; i++)
        {
            results[i] = EvaluateOne(measures[i], prepared, period, cache);
        }

        return results;
    }

    private PatientResult EvaluateOne(MeasureDefinition measure, PreparedPatient patient, MeasurementPeriod period, DefinitionCache cache)
    {
        var state = new EvaluationState(patient, period, measure, cache, _records);
        var evidence = new Dictionary<PopulationKind, IReadOnlyList<string>>();
        var definitions = new Dictionary<PopulationKind, IReadOnlyList<string>>();
        if (patient.Demographics is null)
        {
            state.Find(FindingCodes.MissingPatient, "only records that point at the patient are stored, not the Patient resource", null);
        }
        else if (patient.BirthFirst is null)
        {
            state.Find(FindingCodes.MissingBirthDate, "the patient has no usable birthDate and is in no initial population", null);
        }

        bool Population(PopulationKind kind, bool fallback)
        {
            if (!measure.Populations.TryGetValue(kind, out var criterion))
            {
                return fallback;
            }

            state.Evidence.Clear();
            state.Definitions.Clear();
            var result = Eval(criterion, state, Scope.Root);
            if (result)
            {
                evidence[kind] = [.. state.Evidence.Distinct(StringComparer.Ordinal)];
                definitions[kind] = [.. state.Definitions.Distinct(StringComparer.Ordinal)];
            }

            return result;
        }

        // No birthDate: in no initial population, whatever the definition says.
        var ip = patient.BirthFirst is not null && Population(PopulationKind.InitialPopulation, false);
        var denominator = ip && Population(PopulationKind.Denominator, true);
        if (denominator && !measure.Populations.ContainsKey(PopulationKind.Denominator) && evidence.TryGetValue(PopulationKind.InitialPopulation, out var ipEvidence))
        {
            evidence[PopulationKind.Denominator] = ipEvidence;
        }

        var exclusion = denominator && Population(PopulationKind.DenominatorExclusion, false);
        var numerator = denominator && !exclusion && Population(PopulationKind.Numerator, false);
        var exception = denominator && !exclusion && !numerator && Population(PopulationKind.DenominatorException, false);
        IReadOnlyDictionary<string, string> strata = ip ? Strata(measure, patient, period) : NoStrata;
        return new PatientResult
        {
            PatientId = patient.Facts.PatientId,
            MeasureId = measure.Id,
            InitialPopulation = ip,
            Denominator = denominator,
            DenominatorExclusion = exclusion,
            DenominatorException = exception,
            Numerator = numerator,
            Findings = [.. state.Findings],
            EvaluatedResources = evidence,
            MetDefinitions = definitions,
            Strata = strata,
            Counts = [.. state.Counts],
        };
    }

    internal bool Eval(Criterion criterion, EvaluationState state, Scope scope)
    {
        var mark = state.Mark();
        var result = criterion switch
        {
            AllCriterion all => EvalAll(all, state, scope),
            AnyCriterion any => EvalAny(any, state, scope),
            NotCriterion not => EvalNot(not, state, scope),
            DefinitionCriterion d => EvalDefinition(d, state, scope),
            AgeCriterion age => EvalAge(age, state, scope),
            GenderCriterion g => Demographic(state, state.Patient.Demographics?.Gender == g.Gender),
            BirthdayCriterion b => EvalBirthday(b, state, scope),
            DeceasedCriterion d => EvalDeceased(d, state, scope),
            ExistsCriterion e => EvalExists(e, state, scope),
            CountCriterion c => EvalCount(c, state, scope),
            MostRecentCriterion m => EvalMostRecent(m, state, scope),
            SameDayCriterion s => EvalSameDay(s, state, scope),
            ValueCriterion v => EvalValue(v, state, scope),
            FromCriterion f => scope.Record is { } r && (r.Source.Label == f.SourceLabel),
            _ => false,
        };
        if (!result)
        {
            state.Rollback(mark);
        }

        return result;
    }

    private bool EvalAll(AllCriterion all, EvaluationState state, Scope scope)
    {
        for (var i = 0; i < all.Items.Count; i++)
        {
            if (!Eval(all.Items[i], state, scope))
            {
                // The remaining counts still run: the gap report lists every antigen's doses, not just the first short one.
                for (var j = i + 1; j < all.Items.Count; j++)
                {
                    if (all.Items[j] is CountCriterion count)
                    {
                        Eval(count, state, scope);
                    }
                }

                return false;
            }
        }

        return true;
    }

    private bool EvalAny(AnyCriterion any, EvaluationState state, Scope scope)
    {
        // Every branch is tried so that evidence lists all the ways the criterion was met.
        var met = false;
        foreach (var item in any.Items)
        {
            met |= Eval(item, state, scope);
        }

        return met;
    }

    private bool EvalNot(NotCriterion not, EvaluationState state, Scope scope)
    {
        var mark = state.Mark();
        var inner = Eval(not.Inner, state, scope);
        state.Rollback(mark);
        return !inner;
    }

    private static bool Demographic(EvaluationState state, bool result)
    {
        if (result)
        {
            state.Evidence.Add(state.Patient.Reference);
        }

        return result;
    }

    private bool EvalDefinition(DefinitionCriterion reference, EvaluationState state, Scope scope)
    {
        var definition = reference.Target!;
        if (scope.Record is null && scope.Named is null)
        {
            if (!state.Cache.TryGet(definition, out var cached))
            {
                var inner = new EvaluationState(state.Patient, state.Period, state.Measure, state.Cache, state.Records) { Chosen = state.Chosen, OpenWindowStart = state.OpenWindowStart };
                var value = Eval(definition.Body, inner, scope);
                cached = new DefinitionCache.Entry(value, [.. inner.Evidence], [.. inner.Definitions], [.. inner.Findings], [.. inner.Counts]);
                state.Cache.Add(definition, cached);
            }

            state.AddFindings(cached.Findings);
            state.AddCounts(cached.Counts);
            if (cached.Result)
            {
                state.Evidence.AddRange(cached.Evidence);
                state.Definitions.AddRange(cached.Definitions);
                state.Definitions.Add(definition.QualifiedName);
            }

            return cached.Result;
        }

        var result = Eval(definition.Body, state, scope);
        if (result)
        {
            state.Definitions.Add(definition.QualifiedName);
        }

        return result;
    }

    internal static DateOnly? Resolve(DateExpression? expression, EvaluationState state, Scope scope)
    {
        if (expression is null)
        {
            return null;
        }

        DateOnly? anchor = expression.Anchor switch
        {
            DateAnchor.PeriodStart => state.Period.Start,
            DateAnchor.PeriodEnd => state.Period.End,
            DateAnchor.BirthDate => state.Patient.BirthFirst,
            _ => scope.Record?.Time.First,
        };
        if (anchor is not { } date)
        {
            return null;
        }

        foreach (var offset in expression.Offsets)
        {
            date = Calendar.Add(date, offset);
        }

        return date;
    }

    private static bool EvalAge(AgeCriterion age, EvaluationState state, Scope scope)
    {
        var patient = state.Patient;
        if (patient.BirthFirst is not { } first || Resolve(age.On, state, scope) is not { } on)
        {
            return false;
        }

        bool Holds(DateOnly birth) =>
            (age.AtLeast is null || Calendar.HasReached(birth, age.AtLeast, on))
            && (age.AtMost is null || !Calendar.HasReached(birth, age.AtMost with { Amount = age.AtMost.Amount + 1 }, on))
            && (age.Below is null || !Calendar.HasReached(birth, age.Below, on));

        var result = Holds(first);
        if (patient.BirthPartial && Holds(patient.BirthLast!.Value) != result)
        {
            state.Find(FindingCodes.PartialBirthDate, $"the partial birthDate '{patient.Demographics?.BirthDate}' was taken at its first day; the age test on {on:yyyy-MM-dd} depends on the exact day", null);
        }

        return Demographic(state, result);
    }

    private static bool EvalBirthday(BirthdayCriterion birthday, EvaluationState state, Scope scope)
    {
        var patient = state.Patient;
        if (patient.BirthFirst is not { } first)
        {
            return false;
        }

        var from = Resolve(birthday.Within.From, state, scope);
        var to = Resolve(birthday.Within.To, state, scope);
        bool Holds(DateOnly birth)
        {
            var day = Calendar.AddMonths(birth, 12 * birthday.Years);
            return (from is null || day >= from) && (to is null || day <= to);
        }

        var result = Holds(first);
        if (patient.BirthPartial && Holds(patient.BirthLast!.Value) != result)
        {
            state.Find(FindingCodes.PartialBirthDate, $"the partial birthDate '{patient.Demographics?.BirthDate}' was taken at its first day; the birthday test depends on the exact day", null);
        }

        return Demographic(state, result);
    }

    private static bool EvalDeceased(DeceasedCriterion deceased, EvaluationState state, Scope scope)
    {
        var patient = state.Patient;
        var from = Resolve(deceased.Window.From, state, scope);
        var to = Resolve(deceased.Window.To, state, scope);
        if ((deceased.Window.From is not null && from is null) || (deceased.Window.To is not null && to is null))
        {
            return false;
        }

        bool result;
        if (patient.Death is { } death)
        {
            result = deceased.Timing == Timing.Overlaps
                ? (to is null || death.First <= to) && (from is null || death.Last >= from)
                : (from is null || death.First >= from) && (to is null || death.Last <= to);
        }
        else
        {
            // Died at an unknown time: before any window start.
            result = patient.DiedUndated && from is null;
        }

        return Demographic(state, result);
    }

    private bool EvalExists(ExistsCriterion exists, EvaluationState state, Scope scope)
    {
        var found = false;
        foreach (var candidate in Retrieve(exists.Retrieve, state, scope))
        {
            state.Evidence.Add(candidate.Record.Reference);
            found = true;
        }

        return found;
    }

    private bool EvalCount(CountCriterion count, EvaluationState state, Scope scope)
    {
        var candidates = Retrieve(count.Retrieve, state, scope).ToList();
        var counted = count.DistinctDates
            ? candidates.Select(c => c.Time.DateKey).Distinct(StringComparer.Ordinal).Count()
            : candidates.Count;
        var label = count.Label ?? count.Retrieve.Label;
        if (label is not null)
        {
            state.AddCount(new CountDetail(label, counted, count.AtLeast));
        }

        if (counted < count.AtLeast)
        {
            return false;
        }

        state.Evidence.AddRange(candidates.Select(c => c.Record.Reference));
        return true;
    }

    private bool EvalMostRecent(MostRecentCriterion mostRecent, EvaluationState state, Scope scope)
    {
        Candidate? best = null;
        List<Candidate>? tied = null;
        foreach (var candidate in Retrieve(mostRecent.Retrieve, state, scope))
        {
            if (best is null || candidate.Time.First > best.Time.First)
            {
                best = candidate;
                tied = null;
            }
            else if (candidate.Time.First == best.Time.First)
            {
                tied ??= [best];
                tied.Add(candidate);
            }
        }

        if (best is null)
        {
            return false;
        }

        if (tied is not null)
        {
            tied.Sort((a, b) => CompareTie(a, b, mostRecent.TieBreak));
            best = tied[0];
        }

        state.Evidence.Add(best.Record.Reference);
        state.Chosen?.Add((mostRecent, new Scope(best, null)));
        return mostRecent.Then is null || Eval(mostRecent.Then, state, new Scope(best, null));
    }

    /// <summary>Orders the candidates of one date so that the chosen one comes first; the id settles what the keys leave equal.</summary>
    private static int CompareTie(Candidate a, Candidate b, IReadOnlyList<TieBreak> keys)
    {
        foreach (var key in keys)
        {
            var order = key switch
            {
                TieBreak.Source => a.SourceIndex.CompareTo(b.SourceIndex),
                TieBreak.Latest => -StatedTime.CompareRank(a.Time, b.Time),
                TieBreak.LowestValue => CompareValues(a.Value, b.Value),
                _ => -CompareValues(a.Value, b.Value),
            };
            if (order != 0)
            {
                return order;
            }
        }

        return string.CompareOrdinal(a.Record.Reference, b.Record.Reference);
    }

    /// <summary>Lower first; records without a comparable value last.</summary>
    private static int CompareValues(decimal? a, decimal? b) => (a, b) switch
    {
        (null, null) => 0,
        (null, _) => 1,
        (_, null) => -1,
        _ => a.Value.CompareTo(b.Value),
    };

    private bool EvalSameDay(SameDayCriterion sameDay, EvaluationState state, Scope scope)
    {
        var perValue = new List<Dictionary<string, Candidate>>();
        foreach (var value in sameDay.Values)
        {
            var byDay = new Dictionary<string, Candidate>(StringComparer.Ordinal);
            foreach (var candidate in Retrieve(value.Retrieve, state, scope))
            {
                if (candidate.Value is null || !candidate.Time.IsWholeDay)
                {
                    continue;
                }

                var day = candidate.Time.DateKey;
                if (!byDay.TryGetValue(day, out var current) || Better(candidate, current, value.Pick))
                {
                    byDay[day] = candidate;
                }
            }

            perValue.Add(byDay);
        }

        string? latest = null;
        foreach (var day in perValue[0].Keys)
        {
            if (perValue.All(d => d.ContainsKey(day)) && (latest is null || string.CompareOrdinal(day, latest) > 0))
            {
                latest = day;
            }
        }

        if (latest is null)
        {
            return false;
        }

        var named = new Dictionary<string, Candidate>(StringComparer.Ordinal);
        for (var i = 0; i < sameDay.Values.Count; i++)
        {
            named[sameDay.Values[i].Name] = perValue[i][latest];
            state.Evidence.Add(perValue[i][latest].Record.Reference);
        }

        state.Chosen?.Add((sameDay, new Scope(scope.Record, named)));
        return sameDay.Then is null || Eval(sameDay.Then, state, new Scope(scope.Record, named));
    }

    private static bool Better(Candidate candidate, Candidate current, Pick pick)
    {
        var order = candidate.Value!.Value.CompareTo(current.Value!.Value);
        if (order == 0)
        {
            return string.CompareOrdinal(candidate.Record.Reference, current.Record.Reference) < 0;
        }

        return pick == Pick.Lowest ? order < 0 : order > 0;
    }

    private static bool EvalValue(ValueCriterion test, EvaluationState state, Scope scope)
    {
        var candidate = test.Of is null ? scope.Record : scope.Named?.GetValueOrDefault(test.Of);
        if (candidate is null)
        {
            return false;
        }

        var quantity = candidate.Quantity;
        if (quantity?.Value is not { } value)
        {
            state.Find(FindingCodes.ValueNotQuantity, "the value compared is not a quantity with a number", candidate.Record.Reference);
            return false;
        }

        if (Quantities.UnitOf(quantity) is not { } unit || !Quantities.TryConvert(value, unit, test.Threshold.Unit, state.Measure.UnitConversions, out var converted))
        {
            state.Find(FindingCodes.UnconvertibleUnit, $"a value in '{quantity.Code ?? quantity.Unit}' ({quantity.System ?? "no system"}) cannot be compared in '{test.Threshold.Unit}'", candidate.Record.Reference);
            return false;
        }

        var passes = Quantities.Passes(converted, quantity.Comparator, test.Comparison, test.Threshold.Value);
        if (passes is null)
        {
            state.Find(FindingCodes.UnjudgedComparator, $"the comparator '{quantity.Comparator}' cannot be judged against a threshold", candidate.Record.Reference);
            return false;
        }

        return passes.Value;
    }

    /// <summary>Counting records of a retrieve (anyOf pooled, in the order of its entries).</summary>
    private IEnumerable<Candidate> Retrieve(Retrieve retrieve, EvaluationState state, Scope scope, int sourceIndex = 0)
    {
        if (retrieve.AnyOf is { } parts)
        {
            for (var i = 0; i < parts.Count; i++)
            {
                foreach (var candidate in Retrieve(parts[i], state, scope, i))
                {
                    yield return candidate;
                }
            }

            yield break;
        }

        var from = state.OpenWindowStart ? null : Resolve(retrieve.Window?.From, state, scope);
        var to = Resolve(retrieve.Window?.To, state, scope);
        if ((!state.OpenWindowStart && retrieve.Window?.From is not null && from is null) || (retrieve.Window?.To is not null && to is null))
        {
            yield break;
        }

        foreach (var record in state.Patient.OfType(retrieve.ResourceType))
        {
            var fact = record.Fact;
            if (retrieve.ValueSet is { } valueSet && !valueSet.ContainsAny(fact.Codes))
            {
                continue;
            }

            if (!Counts(retrieve, fact, out var component))
            {
                continue;
            }

            if (!TimeMatches(retrieve, record, from, to, state, scope))
            {
                continue;
            }

            if (retrieve.AgeAtEventAtLeast is { } minimumAge && (state.Patient.BirthFirst is not { } birth || !Calendar.HasReached(birth, minimumAge, record.Point!.Value.First)))
            {
                continue;
            }

            var quantity = retrieve.ComponentValueSet is null ? fact.Quantity : component?.Quantity;
            decimal? value = null;
            if (retrieve.ValueIn is { } valueIn)
            {
                if (quantity?.Value is not { } raw)
                {
                    state.Find(FindingCodes.ValueNotQuantity, "the record's value is not a quantity with a number", record.Reference);
                    continue;
                }

                if (Quantities.UnitOf(quantity) is not { } unit || !Quantities.TryConvert(raw, unit, valueIn, state.Measure.UnitConversions, out var converted))
                {
                    state.Find(FindingCodes.UnconvertibleUnit, $"a value in '{quantity.Code ?? quantity.Unit}' ({quantity.System ?? "no system"}) cannot be converted to '{valueIn}'", record.Reference);
                    continue;
                }

                value = converted;
            }
            else if (quantity?.Value is { } raw && Quantities.UnitOf(quantity) is not null)
            {
                value = raw;
            }

            if (retrieve.Where.Count > 0 && !WhereHolds(retrieve, record, state))
            {
                continue;
            }

            yield return new Candidate(record, retrieve, sourceIndex, quantity, value);
        }
    }

    /// <summary>The status rules: the type's defaults, with the retrieve's own status list instead of the default statuses.</summary>
    private static bool Counts(Retrieve retrieve, ClinicalFact fact, out FactComponent? component)
    {
        component = null;
        if (fact.Status == "entered-in-error")
        {
            return false;
        }

        switch (fact.ResourceType)
        {
            case "Observation":
                if (!(retrieve.Status ?? ObservationStatuses).Contains(fact.Status ?? ""))
                {
                    return false;
                }

                if (retrieve.DataAbsentReason is { } reasons)
                {
                    return fact.DataAbsentReason.Any(c => c.System == CodeSystems.DataAbsentReason && c.Code is not null && reasons.Contains(c.Code));
                }

                if (retrieve.ComponentValueSet is { } componentSet)
                {
                    component = fact.Components.FirstOrDefault(c => componentSet.ContainsAny(c.Codes) && c.Quantity is not null);
                    return component is not null;
                }

                return fact.HasValue || fact.Components.Any(c => c.Quantity is not null);
            case "DiagnosticReport":
                return (retrieve.Status ?? ReportStatuses).Contains(fact.Status ?? "") && fact.HasValue;
            case "Procedure":
                return (retrieve.Status ?? Completed).Contains(fact.Status ?? "") && ReasonMatches(retrieve, fact);
            case "Immunization":
                return (retrieve.Status ?? Completed).Contains(fact.Status ?? "") && fact.IsSubpotent != true && ReasonMatches(retrieve, fact);
            case "Encounter":
                return (retrieve.Status ?? Finished).Contains(fact.Status ?? "")
                    && (retrieve.EncounterClass is null || (fact.EncounterClass is { System: CodeSystems.ActCode, Code: { } cls } && retrieve.EncounterClass.Contains(cls)))
                    && (retrieve.DischargeDisposition is null || fact.DischargeDisposition.Any(c => c.System == CodeSystems.DischargeDisposition && c.Code is not null && retrieve.DischargeDisposition.Contains(c.Code)));
            case "MedicationRequest":
                return (retrieve.Status ?? ActiveOrCompleted).Contains(fact.Status ?? "");
            case "ServiceRequest":
                return (retrieve.Status ?? ActiveOrCompleted).Contains(fact.Status ?? "") && OrderIntents.Contains(fact.Intent ?? "");
            case "Condition":
                var verification = fact.VerificationStatus.FirstOrDefault(c => c.System is null or CodeSystems.ConditionVerification);
                return verification is null || verification.Code == "confirmed";
            default:
                return false;
        }
    }

    private static bool ReasonMatches(Retrieve retrieve, ClinicalFact fact) =>
        retrieve.StatusReason is null || fact.StatusReason.Any(c => c.System == CodeSystems.ActReason && c.Code is not null && retrieve.StatusReason.Contains(c.Code));

    private static bool TimeMatches(Retrieve retrieve, PreparedRecord record, DateOnly? from, DateOnly? to, EvaluationState state, Scope scope)
    {
        var fact = record.Fact;
        if (fact.ResourceType == "Condition")
        {
            return ConditionMatches(retrieve, record, from, to, state, scope);
        }

        if (record.Point is not { } point)
        {
            state.Find(FindingCodes.NoUsableTime, $"a {fact.ResourceType} with no usable time element ({TimeElementOf(fact.ResourceType)}) never qualifies", record.Reference);
            return false;
        }

        bool Inside(DateOnly first, DateOnly last) => (from is null || first >= from) && (to is null || last <= to);
        bool Overlaps(DateOnly first, DateOnly last) => (to is null || first <= to) && (from is null || last >= from);

        switch (retrieve.Timing)
        {
            case Timing.OnsetOnOrBefore:
                return (to is null || point.First <= to) && (from is null || point.First >= from);
            case Timing.OnsetBefore:
                return from is null || point.First < from;
            case Timing.Overlaps when record.IsPeriod:
                return Overlaps(record.PeriodStart?.First ?? DateOnly.MinValue, record.PeriodEnd?.Last ?? DateOnly.MaxValue);
            case Timing.Overlaps:
                return Overlaps(point.First, point.Last);
            case Timing.StartsIn when fact.ResourceType == "Encounter":
                if (record.PeriodStart is not { } start)
                {
                    state.Find(FindingCodes.NoUsableTime, "an Encounter whose period has no start never starts in a window", record.Reference);
                    return false;
                }

                return Inside(start.First, start.Last);
            case Timing.EndsIn when fact.ResourceType == "Encounter":
                return record.PeriodEnd is { } end && Inside(end.First, end.Last);
            case Timing.In when fact.ResourceType == "Encounter":
                return record.PeriodStart is { } s && record.PeriodEnd is { } e && Inside(s.First, e.Last);
            default:
                return Inside(point.First, point.Last);
        }
    }

    private static bool ConditionMatches(Retrieve retrieve, PreparedRecord record, DateOnly? from, DateOnly? to, EvaluationState state, Scope scope)
    {
        if (retrieve.Timing is Timing.OnsetOnOrBefore or Timing.OnsetBefore)
        {
            // History rules need only the onset; recordedDate stands in for a missing one in on-or-before tests only.
            var first = retrieve.Timing == Timing.OnsetOnOrBefore ? record.OnsetFirst ?? record.RecordedFirst : record.OnsetFirst;
            if (first is null)
            {
                state.Find(FindingCodes.NoUsableTime, retrieve.Timing == Timing.OnsetOnOrBefore
                    ? "a Condition with neither onset nor recordedDate never qualifies"
                    : "a Condition without a usable onset never qualifies for an onset-before test", record.Reference);
                return false;
            }

            var onsetHolds = retrieve.Timing == Timing.OnsetBefore
                ? from is null || first < from
                : (to is null || first <= to) && (from is null || first >= from);
            return onsetHolds && (retrieve.NotAbatedBefore is null || NotAbatedBefore(retrieve, record, state, scope));
        }

        if (record.OnsetFirst is not { } onset)
        {
            state.Find(FindingCodes.NoUsableTime, "a Condition without a usable onset never qualifies (recordedDate stands in only for on-or-before tests)", record.Reference);
            return false;
        }

        DateOnly end;
        if (record.AbatementPresent)
        {
            if (record.AbatementLast is not { } abated)
            {
                state.Find(FindingCodes.ConditionUndatedAbatement, "a Condition with an abatement that carries no date never counts as ongoing", record.Reference);
                return false;
            }

            end = abated;
        }
        else if (retrieve.IgnoreClinicalStatus || IsOngoing(record.Fact))
        {
            end = retrieve.AssumedDuration is { } duration ? Calendar.Add(onset, duration) : DateOnly.MaxValue;
        }
        else
        {
            state.Find(FindingCodes.ConditionNoEndDate, "a Condition inactive, in remission or resolved without an abatement date does not count", record.Reference);
            return false;
        }

        return retrieve.Timing switch
        {
            Timing.In => (from is null || onset >= from) && (to is null || end <= to),
            _ => (to is null || onset <= to) && (from is null || end >= from),
        };
    }

    private static bool NotAbatedBefore(Retrieve retrieve, PreparedRecord record, EvaluationState state, Scope scope)
    {
        if (Resolve(retrieve.NotAbatedBefore, state, scope) is not { } date)
        {
            return false;
        }

        if (record.AbatementPresent)
        {
            if (record.AbatementLast is not { } abated)
            {
                state.Find(FindingCodes.ConditionUndatedAbatement, "a Condition with an abatement that carries no date never counts as ongoing", record.Reference);
                return false;
            }

            return abated >= date;
        }

        if (retrieve.IgnoreClinicalStatus || IsOngoing(record.Fact))
        {
            return true;
        }

        state.Find(FindingCodes.ConditionNoEndDate, "a Condition inactive, in remission or resolved without an abatement date does not count", record.Reference);
        return false;
    }

    private static bool IsOngoing(ClinicalFact fact)
    {
        var clinical = fact.ClinicalStatus.FirstOrDefault(c => c.System is null or CodeSystems.ConditionClinical);
        return clinical?.Code is null || OngoingClinical.Contains(clinical.Code);
    }

    private static string TimeElementOf(string type) => type switch
    {
        "Observation" or "DiagnosticReport" => "effectiveDateTime, effectiveInstant or effectivePeriod",
        "Procedure" => "performedDateTime or performedPeriod",
        "Immunization" => "occurrenceDateTime",
        "Encounter" => "period",
        _ => "authoredOn",
    };

    private static bool WhereHolds(Retrieve retrieve, PreparedRecord record, EvaluationState state)
    {
        var resource = state.Records?.Load(record.Fact.ResourceType, record.Fact.Id);
        if (resource is null)
        {
            state.Find(FindingCodes.ResourceUnavailable, "a FHIRPath filter needs the record itself, which could not be loaded", record.Reference);
            return false;
        }

        foreach (var filter in retrieve.Where)
        {
            if (!filter.Compiled.Predicate(resource, new FhirEvaluationContext()))
            {
                return false;
            }
        }

        return true;
    }

    private static Dictionary<string, string> Strata(MeasureDefinition measure, PreparedPatient patient, MeasurementPeriod period)
    {
        var strata = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var stratifier in measure.Stratifiers)
        {
            strata[stratifier.Id] = stratifier.Kind switch
            {
                StratifierKind.AgeBand => AgeBandOf(stratifier, patient, period),
                StratifierKind.Gender => patient.Demographics?.Gender ?? "unknown",
                StratifierKind.Payer => Payer.Of(patient.Facts, period),
                _ => patient.Demographics?.GeneralPractitioner ?? "unattributed",
            };
        }

        return strata;
    }

    private static string AgeBandOf(StratifierDefinition stratifier, PreparedPatient patient, MeasurementPeriod period)
    {
        if (patient.BirthFirst is not { } birth)
        {
            return "unknown";
        }

        var on = stratifier.AgeOn!.Anchor == DateAnchor.PeriodStart ? period.Start : period.End;
        foreach (var offset in stratifier.AgeOn.Offsets)
        {
            on = Calendar.Add(on, offset);
        }

        var age = Calendar.AgeInYears(birth, on);
        foreach (var band in stratifier.Bands)
        {
            if ((band.Low is null || age >= band.Low) && (band.High is null || age <= band.High))
            {
                return band.Code;
            }
        }

        return "other";
    }
}
