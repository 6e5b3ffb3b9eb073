using System.Globalization;
using System.Text.Json;
using System.Text.RegularExpressions;
using Hl7.FhirPath;

namespace MeasureEval.Engine;

/// <summary>
/// Turns one definition file into its syntax tree, collecting every located issue (unknown keys, wrong types,
/// bad dates, FHIRPath that does not compile). References to definitions and value sets are checked later,
/// by <see cref="MeasureRepository"/>, once every file has been read.
/// </summary>
internal sealed partial class DefinitionParser
{
    public const string FormatTag = "measureeval/1";

    private static readonly string[] ResourceTypes =
        ["Observation", "DiagnosticReport", "Procedure", "Immunization", "Encounter", "Condition", "ServiceRequest", "MedicationRequest"];

    private static readonly string[] CriterionKeys =
        ["all", "any", "not", "definition", "age", "gender", "birthday", "deceased", "exists", "count", "mostRecent", "sameDay", "value", "from"];

    private readonly string _file;
    private readonly List<DefinitionIssue> _issues;
    private readonly FhirPathCompiler _fhirPath;

    public DefinitionParser(string file, List<DefinitionIssue> issues, FhirPathCompiler fhirPath)
    {
        _file = file;
        _issues = issues;
        _fhirPath = fhirPath;
    }

    /// <summary>Value set ids named anywhere in the file, with where they were named.</summary>
    public List<(string Id, string Path)> ValueSetReferences { get; } = [];

    /// <summary>Definition references, resolved by the repository.</summary>
    public List<DefinitionCriterion> DefinitionReferences { get; } = [];

    public void Error(string path, string message) => _issues.Add(new DefinitionIssue(_file, path, message));

    public void CheckKeys(JsonElement obj, string path, params string[] allowed)
    {
        foreach (var property in obj.EnumerateObject())
        {
            if (Array.IndexOf(allowed, property.Name) < 0)
            {
                Error($"{path}.{property.Name}", $"unknown key '{property.Name}' (allowed: {string.Join(", ", allowed)})");
            }
        }
    }

    public string? String(JsonElement obj, string key, string path, bool required)
    {
        if (!obj.TryGetProperty(key, out var value))
        {
            if (required)
            {
                Error(path, $"'{key}' is required");
            }

            return null;
        }

        if (value.ValueKind != JsonValueKind.String || string.IsNullOrWhiteSpace(value.GetString()))
        {
            Error($"{path}.{key}", "must be a non-empty string");
            return null;
        }

        return value.GetString();
    }

    public List<string> Strings(JsonElement obj, string key, string path)
    {
        var result = new List<string>();
        if (!obj.TryGetProperty(key, out var value))
        {
            return result;
        }

        if (value.ValueKind != JsonValueKind.Array)
        {
            Error($"{path}.{key}", "must be a list of strings");
            return result;
        }

        var i = 0;
        foreach (var item in value.EnumerateArray())
        {
            if (item.ValueKind == JsonValueKind.String && !string.IsNullOrWhiteSpace(item.GetString()))
            {
                result.Add(item.GetString()!);
            }
            else
            {
                Error($"{path}.{key}[{i}]", "must be a non-empty string");
            }

            i++;
        }

        return result;
    }

    public Criterion? Criterion(JsonElement element, string path, bool insideThen)
    {
        if (element.ValueKind != JsonValueKind.Object)
        {
            Error(path, "a criterion must be an object");
            return null;
        }

        string? label = null;
        var keys = new List<string>();
        foreach (var property in element.EnumerateObject())
        {
            if (property.Name == "label")
            {
                label = property.Value.ValueKind == JsonValueKind.String ? property.Value.GetString() : null;
                if (label is null)
                {
                    Error($"{path}.label", "must be a string");
                }
            }
            else if (Array.IndexOf(CriterionKeys, property.Name) >= 0)
            {
                keys.Add(property.Name);
            }
            else
            {
                Error($"{path}.{property.Name}", $"unknown criterion '{property.Name}' (one of: {string.Join(", ", CriterionKeys)})");
            }
        }

        if (keys.Count != 1)
        {
            if (keys.Count > 1)
            {
                Error(path, $"a criterion has exactly one of its keys, found {string.Join(", ", keys)}");
            }
            else
            {
                Error(path, "a criterion needs one of: " + string.Join(", ", CriterionKeys));
            }

            return null;
        }

        var key = keys[0];
        var body = element.GetProperty(key);
        var bodyPath = $"{path}.{key}";
        Criterion? result = key switch
        {
            "all" => List(body, bodyPath, insideThen) is { } all ? new AllCriterion(path, all) : null,
            "any" => List(body, bodyPath, insideThen) is { } any ? new AnyCriterion(path, any) : null,
            "not" => Criterion(body, bodyPath, insideThen) is { } inner ? new NotCriterion(path, inner) : null,
            "definition" => DefinitionRef(body, path, bodyPath),
            "age" => Age(body, path, bodyPath, insideThen),
            "gender" => Gender(body, path, bodyPath),
            "birthday" => Birthday(body, path, bodyPath, insideThen),
            "deceased" => Deceased(body, path, bodyPath, insideThen),
            "exists" => Retrieve(body, bodyPath, insideThen) is { } r ? new ExistsCriterion(path, r) : null,
            "count" => Count(body, path, bodyPath, insideThen),
            "mostRecent" => MostRecent(body, path, bodyPath, insideThen),
            "sameDay" => SameDay(body, path, bodyPath, insideThen),
            "value" => insideThen ? Value(body, path, bodyPath) : NotHere(bodyPath, "value"),
            "from" => insideThen ? From(body, path, bodyPath) : NotHere(bodyPath, "from"),
            _ => null,
        };
        if (result is not null && label is not null)
        {
            result = Relabel(result, label);
        }

        return result;
    }

    private Criterion? NotHere(string path, string key)
    {
        Error(path, $"'{key}' is only allowed inside the 'then' of mostRecent or sameDay");
        return null;
    }

    private static Criterion Relabel(Criterion c, string label) => c switch
    {
        AllCriterion a => new AllCriterion(a.Path, a.Items) { Label = label },
        AnyCriterion a => new AnyCriterion(a.Path, a.Items) { Label = label },
        NotCriterion n => new NotCriterion(n.Path, n.Inner) { Label = label },
        DefinitionCriterion d => d,
        AgeCriterion a => new AgeCriterion(a.Path, a.On) { AtLeast = a.AtLeast, AtMost = a.AtMost, Below = a.Below, Label = label },
        GenderCriterion g => new GenderCriterion(g.Path, g.Gender) { Label = label },
        BirthdayCriterion b => new BirthdayCriterion(b.Path, b.Years, b.Within) { Label = label },
        DeceasedCriterion d => new DeceasedCriterion(d.Path, d.Window, d.Timing) { Label = label },
        ExistsCriterion e => new ExistsCriterion(e.Path, e.Retrieve) { Label = label },
        CountCriterion c2 => new CountCriterion(c2.Path, c2.Retrieve, c2.DistinctDates, c2.AtLeast) { Label = label },
        MostRecentCriterion m => new MostRecentCriterion(m.Path, m.Retrieve, m.TieBreak, m.Then) { Label = label },
        SameDayCriterion s => new SameDayCriterion(s.Path, s.Values, s.Then) { Label = label },
        ValueCriterion v => new ValueCriterion(v.Path, v.Comparison, v.Threshold, v.Of) { Label = label },
        FromCriterion f => new FromCriterion(f.Path, f.SourceLabel) { Label = label },
        _ => c,
    };

    private List<Criterion>? List(JsonElement body, string path, bool insideThen)
    {
        if (body.ValueKind != JsonValueKind.Array || body.GetArrayLength() == 0)
        {
            Error(path, "must be a non-empty list of criteria");
            return null;
        }

        var items = new List<Criterion>();
        var ok = true;
        var i = 0;
        foreach (var item in body.EnumerateArray())
        {
            var c = Criterion(item, $"{path}[{i++}]", insideThen);
            if (c is null)
            {
                ok = false;
            }
            else
            {
                items.Add(c);
            }
        }

        return ok ? items : null;
    }

    private DefinitionCriterion? DefinitionRef(JsonElement body, string path, string bodyPath)
    {
        if (body.ValueKind != JsonValueKind.String || string.IsNullOrWhiteSpace(body.GetString()))
        {
            Error(bodyPath, "must name a definition");
            return null;
        }

        var reference = new DefinitionCriterion(path, body.GetString()!);
        DefinitionReferences.Add(reference);
        return reference;
    }

    private AgeCriterion? Age(JsonElement body, string path, string bodyPath, bool insideThen)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "on", "atLeast", "atMost", "below");
        var on = Date(body, "on", bodyPath, required: true, insideThen);
        var atLeast = Amount(body, "atLeast", bodyPath, allowDaysWeeks: false);
        var atMost = Amount(body, "atMost", bodyPath, allowDaysWeeks: false);
        var below = Amount(body, "below", bodyPath, allowDaysWeeks: false);
        if (atLeast is null && atMost is null && below is null)
        {
            Error(bodyPath, "an age test needs atLeast, atMost or below");
        }

        return on is null ? null : new AgeCriterion(path, on) { AtLeast = atLeast, AtMost = atMost, Below = below };
    }

    private GenderCriterion? Gender(JsonElement body, string path, string bodyPath)
    {
        var value = body.ValueKind == JsonValueKind.String ? body.GetString() : null;
        if (value is not ("female" or "male" or "other" or "unknown"))
        {
            Error(bodyPath, "must be an administrative gender code: female, male, other or unknown");
            return null;
        }

        return new GenderCriterion(path, value);
    }

    private BirthdayCriterion? Birthday(JsonElement body, string path, string bodyPath, bool insideThen)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "years", "within");
        int? years = null;
        if (!body.TryGetProperty("years", out var y) || y.ValueKind != JsonValueKind.Number || !y.TryGetInt32(out var yv) || yv < 0)
        {
            Error($"{bodyPath}.years", "must be a whole number of years");
        }
        else
        {
            years = yv;
        }

        var within = body.TryGetProperty("within", out var w) ? Window(w, $"{bodyPath}.within", insideThen) : null;
        if (within is null && !body.TryGetProperty("within", out _))
        {
            Error(bodyPath, "'within' is required");
        }

        return years is null || within is null ? null : new BirthdayCriterion(path, years.Value, within);
    }

    private DeceasedCriterion? Deceased(JsonElement body, string path, string bodyPath, bool insideThen)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "from", "to", "timing");
        var window = Window(body, bodyPath, insideThen, "timing");
        var timing = TimingOf(body, bodyPath, Timing.In);
        if (timing is not (Timing.In or Timing.Overlaps))
        {
            Error($"{bodyPath}.timing", "a death date is tested with 'in' or 'overlaps'");
        }

        return window is null ? null : new DeceasedCriterion(path, window, timing);
    }

    private CountCriterion? Count(JsonElement body, string path, string bodyPath, bool insideThen)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "of", "distinctDates", "atLeast");
        var retrieve = body.TryGetProperty("of", out var of) ? Retrieve(of, $"{bodyPath}.of", insideThen) : Missing<Retrieve>(bodyPath, "of");
        var distinct = false;
        if (body.TryGetProperty("distinctDates", out var d))
        {
            if (d.ValueKind is JsonValueKind.True or JsonValueKind.False)
            {
                distinct = d.GetBoolean();
            }
            else
            {
                Error($"{bodyPath}.distinctDates", "must be true or false");
            }
        }

        int? atLeast = null;
        if (!body.TryGetProperty("atLeast", out var a) || a.ValueKind != JsonValueKind.Number || !a.TryGetInt32(out var av) || av < 1)
        {
            Error($"{bodyPath}.atLeast", "must be a whole number ≥ 1");
        }
        else
        {
            atLeast = av;
        }

        return retrieve is null || atLeast is null ? null : new CountCriterion(path, retrieve, distinct, atLeast.Value);
    }

    private MostRecentCriterion? MostRecent(JsonElement body, string path, string bodyPath, bool insideThen)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "of", "tieBreak", "then");
        var retrieve = body.TryGetProperty("of", out var of) ? Retrieve(of, $"{bodyPath}.of", insideThen) : Missing<Retrieve>(bodyPath, "of");
        var tieBreak = new List<TieBreak>();
        foreach (var (text, i) in Strings(body, "tieBreak", bodyPath).Select((t, i) => (t, i)))
        {
            TieBreak? tb = text switch
            {
                "source" => Engine.TieBreak.Source,
                "latest" => Engine.TieBreak.Latest,
                "lowestValue" => Engine.TieBreak.LowestValue,
                "highestValue" => Engine.TieBreak.HighestValue,
                _ => null,
            };
            if (tb is null)
            {
                Error($"{bodyPath}.tieBreak[{i}]", "one of: source, latest, lowestValue, highestValue");
            }
            else
            {
                tieBreak.Add(tb.Value);
            }
        }

        if (!body.TryGetProperty("tieBreak", out _))
        {
            tieBreak.AddRange([Engine.TieBreak.Latest, Engine.TieBreak.LowestValue]);
        }

        Criterion? then = null;
        if (body.TryGetProperty("then", out var t))
        {
            then = Criterion(t, $"{bodyPath}.then", insideThen: true);
            if (then is null)
            {
                return null;
            }
        }

        if (then is not null && retrieve is not null)
        {
            CheckFromLabels(then, retrieve, $"{bodyPath}.then");
        }

        return retrieve is null ? null : new MostRecentCriterion(path, retrieve, tieBreak, then);
    }

    private void CheckFromLabels(Criterion then, Retrieve retrieve, string path)
    {
        var labels = new HashSet<string>(retrieve.Leaves().Select(l => l.Label).OfType<string>(), StringComparer.Ordinal);
        if (retrieve.Label is not null)
        {
            labels.Add(retrieve.Label);
        }

        foreach (var from in Descendants(then).OfType<FromCriterion>())
        {
            if (!labels.Contains(from.SourceLabel))
            {
                Error($"{from.Path}.from", $"no retrieve labelled '{from.SourceLabel}' in the enclosing mostRecent");
            }
        }
    }

    private SameDayCriterion? SameDay(JsonElement body, string path, string bodyPath, bool insideThen)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "day", "values", "then");
        if (body.TryGetProperty("day", out var day) && (day.ValueKind != JsonValueKind.String || day.GetString() != "latest"))
        {
            Error($"{bodyPath}.day", "only \"latest\" is supported");
        }

        var values = new List<SameDayValue>();
        if (!body.TryGetProperty("values", out var v) || v.ValueKind != JsonValueKind.Object || !v.EnumerateObject().Any())
        {
            Error($"{bodyPath}.values", "must name at least one value: {\"systolic\": {retrieve, \"pick\": \"lowest\"}}");
            return null;
        }

        var ok = true;
        foreach (var property in v.EnumerateObject())
        {
            var vpath = $"{bodyPath}.values.{property.Name}";
            if (!IsObject(property.Value, vpath))
            {
                ok = false;
                continue;
            }

            var pickText = String(property.Value, "pick", vpath, required: true);
            Pick? pick = pickText switch { "lowest" => Pick.Lowest, "highest" => Pick.Highest, null => null, _ => null };
            if (pickText is not null && pick is null)
            {
                Error($"{vpath}.pick", "\"lowest\" or \"highest\"");
            }

            var retrieve = Retrieve(property.Value, vpath, insideThen, "pick");
            if (retrieve is null || pick is null)
            {
                ok = false;
                continue;
            }

            if (retrieve.ValueIn is null)
            {
                Error(vpath, "a sameDay value needs 'valueIn' (the unit its values are compared in)");
                ok = false;
            }

            values.Add(new SameDayValue(property.Name, retrieve, pick.Value));
        }

        Criterion? then = null;
        if (body.TryGetProperty("then", out var t))
        {
            then = Criterion(t, $"{bodyPath}.then", insideThen: true);
            if (then is null)
            {
                return null;
            }

            var names = values.Select(x => x.Name).ToHashSet(StringComparer.Ordinal);
            foreach (var value in Descendants(then).OfType<ValueCriterion>())
            {
                if (value.Of is null || !names.Contains(value.Of))
                {
                    Error($"{value.Path}.value.of", $"name one of the sameDay values: {string.Join(", ", names)}");
                }
            }
        }

        return ok ? new SameDayCriterion(path, values, then) : null;
    }

    private ValueCriterion? Value(JsonElement body, string path, string bodyPath)
    {
        if (!IsObject(body, bodyPath))
        {
            return null;
        }

        CheckKeys(body, bodyPath, "of", "lessThan", "lessOrEqual", "greaterThan", "greaterOrEqual");
        var of = String(body, "of", bodyPath, required: false);
        var found = new List<(Comparison, string)>();
        foreach (var (key, comparison) in new[] { ("lessThan", Comparison.LessThan), ("lessOrEqual", Comparison.LessOrEqual), ("greaterThan", Comparison.GreaterThan), ("greaterOrEqual", Comparison.GreaterOrEqual) })
        {
            if (String(body, key, bodyPath, required: false) is { } text)
            {
                found.Add((comparison, text));
            }
        }

        if (found.Count != 1)
        {
            Error(bodyPath, "a value test has exactly one of lessThan, lessOrEqual, greaterThan, greaterOrEqual");
            return null;
        }

        var threshold = ParseThreshold(found[0].Item2);
        if (threshold is null)
        {
            Error(bodyPath, $"'{found[0].Item2}' is not a number followed by an optional UCUM unit (\"8 %\", \"140 mm[Hg]\", \"10\")");
            return null;
        }

        return new ValueCriterion(path, found[0].Item1, threshold, of);
    }

    private FromCriterion? From(JsonElement body, string path, string bodyPath)
    {
        if (body.ValueKind != JsonValueKind.String || string.IsNullOrWhiteSpace(body.GetString()))
        {
            Error(bodyPath, "must name a retrieve label");
            return null;
        }

        return new FromCriterion(path, body.GetString()!);
    }

    public Retrieve? Retrieve(JsonElement body, string path, bool insideThen, params string[] extraKeys)
    {
        if (!IsObject(body, path))
        {
            return null;
        }

        var label = String(body, "label", path, required: false);
        if (body.TryGetProperty("anyOf", out var anyOf))
        {
            CheckKeys(body, path, ["anyOf", "label", "valueIn", .. extraKeys]);
            if (anyOf.ValueKind != JsonValueKind.Array || anyOf.GetArrayLength() == 0)
            {
                Error($"{path}.anyOf", "must be a non-empty list of retrieves");
                return null;
            }

            var parts = new List<Retrieve>();
            var ok = true;
            var i = 0;
            var pooledValueIn = ValueIn(body, path);
            foreach (var item in anyOf.EnumerateArray())
            {
                var part = Retrieve(item, $"{path}.anyOf[{i++}]", insideThen);
                if (part is null)
                {
                    ok = false;
                }
                else
                {
                    parts.Add(pooledValueIn is null || part.ValueIn is not null ? part : WithValueIn(part, pooledValueIn));
                }
            }

            return ok ? new Retrieve { Path = path, Label = label, AnyOf = parts, ValueIn = pooledValueIn } : null;
        }

        CheckKeys(body, path,
        [
            "resource", "valueSet", "label", "status", "encounterClass", "dischargeDisposition", "statusReason", "dataAbsentReason",
            "component", "window", "timing", "ignoreClinicalStatus", "assumedDuration", "notAbatedBefore", "ageAtEvent", "valueIn", "where", .. extraKeys,
        ]);
        var resource = String(body, "resource", path, required: true);
        if (resource is not null && Array.IndexOf(ResourceTypes, resource) < 0)
        {
            Error($"{path}.resource", $"'{resource}' is not a type measures read (one of: {string.Join(", ", ResourceTypes)})");
            resource = null;
        }

        var valueSet = String(body, "valueSet", path, required: false);
        if (valueSet is not null)
        {
            ValueSetReferences.Add((valueSet, $"{path}.valueSet"));
        }
        else if (resource is not null && resource != "Encounter")
        {
            Error(path, "'valueSet' is required (only Encounter retrieves may select by class alone)");
        }

        var component = String(body, "component", path, required: false);
        if (component is not null)
        {
            ValueSetReferences.Add((component, $"{path}.component"));
            if (resource is not null and not "Observation")
            {
                Error($"{path}.component", "components exist on Observation only");
            }
        }

        var window = body.TryGetProperty("window", out var w) ? Window(w, $"{path}.window", insideThen) : null;
        var defaultTiming = resource == "Condition" ? Timing.Overlaps : Timing.In;
        var timing = TimingOf(body, path, defaultTiming);
        var ignoreClinical = false;
        if (body.TryGetProperty("ignoreClinicalStatus", out var ic))
        {
            if (ic.ValueKind is JsonValueKind.True or JsonValueKind.False)
            {
                ignoreClinical = ic.GetBoolean();
            }
            else
            {
                Error($"{path}.ignoreClinicalStatus", "must be true or false");
            }
        }

        var assumed = Amount(body, "assumedDuration", path, allowDaysWeeks: true);
        if (assumed is not null && resource is not null and not "Condition")
        {
            Error($"{path}.assumedDuration", "only a Condition without abatement has an assumed duration");
        }

        var notAbatedBefore = body.TryGetProperty("notAbatedBefore", out _) ? Date(body, "notAbatedBefore", path, required: true, insideThen) : null;
        if (notAbatedBefore is not null && (resource is not null and not "Condition" || timing is not (Timing.OnsetOnOrBefore or Timing.OnsetBefore)))
        {
            Error($"{path}.notAbatedBefore", "applies to a Condition with timing onsetOnOrBefore or onsetBefore (overlaps already tests abatement)");
        }

        CalendarAmount? ageAtEvent = null;
        if (body.TryGetProperty("ageAtEvent", out var ae))
        {
            if (IsObject(ae, $"{path}.ageAtEvent"))
            {
                CheckKeys(ae, $"{path}.ageAtEvent", "atLeast");
                ageAtEvent = Amount(ae, "atLeast", $"{path}.ageAtEvent", allowDaysWeeks: true);
                if (ageAtEvent is null)
                {
                    Error($"{path}.ageAtEvent", "'atLeast' is required");
                }
            }
        }

        var valueIn = ValueIn(body, path);
        var where = new List<FhirPathFilter>();
        if (body.TryGetProperty("where", out var wh))
        {
            if (wh.ValueKind != JsonValueKind.Array)
            {
                Error($"{path}.where", "must be a list of {\"fhirpath\": \"…\"}");
            }
            else
            {
                var i = 0;
                foreach (var item in wh.EnumerateArray())
                {
                    var ipath = $"{path}.where[{i++}]";
                    if (!IsObject(item, ipath))
                    {
                        continue;
                    }

                    CheckKeys(item, ipath, "fhirpath");
                    var expression = String(item, "fhirpath", ipath, required: true);
                    if (expression is null)
                    {
                        continue;
                    }

                    try
                    {
                        where.Add(new FhirPathFilter(expression, _fhirPath.Compile(expression)));
                    }
                    catch (Exception ex) when (ex is FormatException or InvalidOperationException or ArgumentException or NotSupportedException)
                    {
                        Error($"{ipath}.fhirpath", $"FHIRPath does not compile: {ex.Message}");
                    }
                }
            }
        }

        var status = Codes(body, "status", path);
        if (status is not null && status.Contains("entered-in-error"))
        {
            Error($"{path}.status", "entered-in-error never counts");
        }

        if (resource is null)
        {
            return null;
        }

        return new Retrieve
        {
            Path = path,
            Label = label,
            ResourceType = resource,
            ValueSetId = valueSet,
            Status = status,
            EncounterClass = OnlyFor(body, "encounterClass", path, resource, "Encounter"),
            DischargeDisposition = OnlyFor(body, "dischargeDisposition", path, resource, "Encounter"),
            StatusReason = OnlyFor(body, "statusReason", path, resource, "Immunization", "Procedure"),
            DataAbsentReason = OnlyFor(body, "dataAbsentReason", path, resource, "Observation"),
            ComponentValueSetId = component,
            Window = window,
            Timing = timing,
            IgnoreClinicalStatus = ignoreClinical,
            AssumedDuration = assumed,
            NotAbatedBefore = notAbatedBefore,
            AgeAtEventAtLeast = ageAtEvent,
            ValueIn = valueIn,
            Where = where,
        };
    }

    private string? ValueIn(JsonElement body, string path)
    {
        if (!body.TryGetProperty("valueIn", out var value))
        {
            return null;
        }

        if (value.ValueKind != JsonValueKind.String)
        {
            Error($"{path}.valueIn", "must be a UCUM unit code (\"\" for a unitless score)");
            return null;
        }

        return value.GetString();
    }

    private static Retrieve WithValueIn(Retrieve r, string valueIn) => new()
    {
        Path = r.Path, Label = r.Label, AnyOf = r.AnyOf, ResourceType = r.ResourceType, ValueSetId = r.ValueSetId, Status = r.Status,
        EncounterClass = r.EncounterClass, DischargeDisposition = r.DischargeDisposition, StatusReason = r.StatusReason,
        DataAbsentReason = r.DataAbsentReason, ComponentValueSetId = r.ComponentValueSetId, Window = r.Window, Timing = r.Timing,
        IgnoreClinicalStatus = r.IgnoreClinicalStatus, AssumedDuration = r.AssumedDuration, AgeAtEventAtLeast = r.AgeAtEventAtLeast,
        ValueIn = valueIn, Where = r.Where,
    };

    private HashSet<string>? OnlyFor(JsonElement body, string key, string path, string resource, params string[] types)
    {
        var codes = Codes(body, key, path);
        if (codes is not null && Array.IndexOf(types, resource) < 0)
        {
            Error($"{path}.{key}", $"'{key}' applies to {string.Join(" and ", types)} only");
        }

        return codes;
    }

    private HashSet<string>? Codes(JsonElement body, string key, string path) =>
        body.TryGetProperty(key, out _) ? new HashSet<string>(Strings(body, key, path), StringComparer.Ordinal) : null;

    private Timing TimingOf(JsonElement body, string path, Timing fallback)
    {
        var text = String(body, "timing", path, required: false);
        if (text is null)
        {
            return fallback;
        }

        Timing? timing = text switch
        {
            "in" => Timing.In,
            "overlaps" => Timing.Overlaps,
            "startsIn" => Timing.StartsIn,
            "endsIn" => Timing.EndsIn,
            "onsetOnOrBefore" => Timing.OnsetOnOrBefore,
            "onsetBefore" => Timing.OnsetBefore,
            _ => null,
        };
        if (timing is null)
        {
            Error($"{path}.timing", "one of: in, overlaps, startsIn, endsIn, onsetOnOrBefore, onsetBefore");
            return fallback;
        }

        return timing.Value;
    }

    public DateWindow? Window(JsonElement body, string path, bool insideThen, params string[] extraKeys)
    {
        if (!IsObject(body, path))
        {
            return null;
        }

        if (extraKeys.Length == 0)
        {
            CheckKeys(body, path, "from", "to");
        }

        var hadFrom = body.TryGetProperty("from", out _);
        var hadTo = body.TryGetProperty("to", out _);
        var from = Date(body, "from", path, required: false, insideThen);
        var to = Date(body, "to", path, required: false, insideThen);
        if ((hadFrom && from is null) || (hadTo && to is null))
        {
            return null;
        }

        return new DateWindow(from, to);
    }

    private DateExpression? Date(JsonElement body, string key, string path, bool required, bool insideThen)
    {
        var text = String(body, key, path, required);
        if (text is null)
        {
            return null;
        }

        if (!TryParseDate(text, out var date, out var problem))
        {
            Error($"{path}.{key}", problem);
            return null;
        }

        if (date.Anchor == DateAnchor.Record && !insideThen)
        {
            Error($"{path}.{key}", "'record' is only known inside the 'then' of mostRecent");
            return null;
        }

        return date;
    }

    internal static bool TryParseDate(string text, out DateExpression date, out string problem)
    {
        date = new DateExpression(DateAnchor.PeriodStart, []);
        problem = "";
        var match = DateRegex().Match(text);
        if (!match.Success)
        {
            problem = $"'{text}' is not a date: an anchor (periodStart, periodEnd, birthDate, record) and optional offsets such as \"- 9 years\"";
            return false;
        }

        var anchor = match.Groups["anchor"].Value switch
        {
            "periodStart" => DateAnchor.PeriodStart,
            "periodEnd" => DateAnchor.PeriodEnd,
            "birthDate" => DateAnchor.BirthDate,
            _ => DateAnchor.Record,
        };
        var offsets = new List<CalendarAmount>();
        foreach (Capture capture in match.Groups["offset"].Captures)
        {
            var part = OffsetRegex().Match(capture.Value);
            var n = int.Parse(part.Groups["n"].Value, CultureInfo.InvariantCulture);
            if (part.Groups["sign"].Value == "-")
            {
                n = -n;
            }

            offsets.Add(new CalendarAmount(n, UnitOf(part.Groups["unit"].Value)));
        }

        date = new DateExpression(anchor, offsets) { Text = text };
        return true;
    }

    private CalendarAmount? Amount(JsonElement body, string key, string path, bool allowDaysWeeks)
    {
        var text = String(body, key, path, required: false);
        if (text is null)
        {
            return null;
        }

        var match = AmountRegex().Match(text);
        if (!match.Success)
        {
            Error($"{path}.{key}", $"'{text}' is not an amount such as \"45 years\" or \"6 months\"");
            return null;
        }

        var unit = UnitOf(match.Groups["unit"].Value);
        if (!allowDaysWeeks && unit is CalendarUnit.Day or CalendarUnit.Week)
        {
            Error($"{path}.{key}", "ages are whole years or months");
            return null;
        }

        return new CalendarAmount(int.Parse(match.Groups["n"].Value, CultureInfo.InvariantCulture), unit);
    }

    internal static Threshold? ParseThreshold(string text)
    {
        var match = ThresholdRegex().Match(text);
        if (!match.Success)
        {
            return null;
        }

        return new Threshold(decimal.Parse(match.Groups["n"].Value, NumberStyles.Number, CultureInfo.InvariantCulture), match.Groups["unit"].Value.Trim());
    }

    private static CalendarUnit UnitOf(string unit) => unit.TrimEnd('s') switch
    {
        "day" => CalendarUnit.Day,
        "week" => CalendarUnit.Week,
        "month" => CalendarUnit.Month,
        _ => CalendarUnit.Year,
    };

    private bool IsObject(JsonElement element, string path)
    {
        if (element.ValueKind == JsonValueKind.Object)
        {
            return true;
        }

        Error(path, "must be an object");
        return false;
    }

    private T? Missing<T>(string path, string key) where T : class
    {
        Error(path, $"'{key}' is required");
        return null;
    }

    internal static IEnumerable<Criterion> Descendants(Criterion c)
    {
        yield return c;
        IEnumerable<Criterion> children = c switch
        {
            AllCriterion a => a.Items,
            AnyCriterion a => a.Items,
            NotCriterion n => [n.Inner],
            _ => [],
        };
        foreach (var child in children)
        {
            foreach (var d in Descendants(child))
            {
                yield return d;
            }
        }
    }

    /// <summary>Every criterion under c, through then-branches as well.</summary>
    internal static IEnumerable<Criterion> AllCriteria(Criterion c)
    {
        yield return c;
        IEnumerable<Criterion> children = c switch
        {
            AllCriterion a => a.Items,
            AnyCriterion a => a.Items,
            NotCriterion n => [n.Inner],
            MostRecentCriterion { Then: { } t } => [t],
            SameDayCriterion { Then: { } t } => [t],
            _ => [],
        };
        foreach (var child in children)
        {
            foreach (var d in AllCriteria(child))
            {
                yield return d;
            }
        }
    }

    /// <summary>Every retrieve under c, anyOf containers and their parts.</summary>
    internal static IEnumerable<Retrieve> AllRetrieves(Criterion c) => AllCriteria(c).SelectMany(x => x switch
    {
        ExistsCriterion e => Flatten(e.Retrieve),
        CountCriterion k => Flatten(k.Retrieve),
        MostRecentCriterion m => Flatten(m.Retrieve),
        SameDayCriterion s => s.Values.SelectMany(v => Flatten(v.Retrieve)),
        _ => [],
    });

    private static IEnumerable<Retrieve> Flatten(Retrieve r) => r.AnyOf is null ? [r] : r.AnyOf.SelectMany(Flatten).Prepend(r);

    [GeneratedRegex(@"^\s*(?<anchor>periodStart|periodEnd|birthDate|record)(?<offset>\s*[+-]\s*\d+\s*(?:days?|weeks?|months?|years?))*\s*$")]
    private static partial Regex DateRegex();

    [GeneratedRegex(@"(?<sign>[+-])\s*(?<n>\d+)\s*(?<unit>days?|weeks?|months?|years?)")]
    private static partial Regex OffsetRegex();

    [GeneratedRegex(@"^\s*(?<n>\d+)\s*(?<unit>days?|weeks?|months?|years?)\s*$")]
    private static partial Regex AmountRegex();

    [GeneratedRegex(@"^\s*(?<n>-?\d+(?:\.\d+)?)\s*(?<unit>\S*)\s*$")]
    private static partial Regex ThresholdRegex();
}
