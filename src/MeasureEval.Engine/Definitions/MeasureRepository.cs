using System.Diagnostics.CodeAnalysis;
using System.Globalization;
using System.Text.Json;
using Hl7.FhirPath;
using Hl7.FhirPath.Expressions;
using Hl7.Fhir.FhirPath;

namespace MeasureEval.Engine;

public enum DefinitionFileKind
{
    Measure,
    Library,
    ValueSet,
}

/// <summary>One definition file's bytes and the name errors are reported under ("colorectal-cancer-screening.measure.json", "valuesets/hba1c.json").</summary>
public sealed record DefinitionFile(string Name, DefinitionFileKind Kind, byte[] Content)
{
    /// <summary>Classifies by name: *.measure.json, *.library.json, valuesets/*.json; null for anything else.</summary>
    public static DefinitionFile? FromName(string name, byte[] content)
    {
        var normalized = name.Replace('\\', '/');
        if (normalized.EndsWith(".measure.json", StringComparison.Ordinal))
        {
            return new DefinitionFile(normalized, DefinitionFileKind.Measure, content);
        }

        if (normalized.EndsWith(".library.json", StringComparison.Ordinal))
        {
            return new DefinitionFile(normalized, DefinitionFileKind.Library, content);
        }

        return normalized.StartsWith("valuesets/", StringComparison.Ordinal) && normalized.EndsWith(".json", StringComparison.Ordinal)
            ? new DefinitionFile(normalized, DefinitionFileKind.ValueSet, content)
            : null;
    }
}

/// <summary>
/// Measures, libraries and value sets, loaded and cross-checked together. A file with any issue is left out whole
/// (and so is every measure that depends on it); the rest load. Immutable once built: reload to change it.
/// </summary>
public sealed partial class MeasureRepository
{
    private static readonly FhirPathCompiler FhirPath = new(new SymbolTable().AddStandardFP().AddFhirExtensions());

    private readonly Dictionary<string, MeasureDefinition> _measures;
    private readonly Dictionary<string, LibraryDefinition> _libraries;
    private readonly Dictionary<string, ValueSetIndex> _valueSets;

    private MeasureRepository(Dictionary<string, MeasureDefinition> measures, Dictionary<string, LibraryDefinition> libraries, Dictionary<string, ValueSetIndex> valueSets, IReadOnlyList<DefinitionFile> files)
    {
        _measures = measures;
        _libraries = libraries;
        _valueSets = valueSets;
        Files = files;
    }

    /// <summary>Measures in id order.</summary>
    public IReadOnlyCollection<MeasureDefinition> Measures => [.. _measures.Values.OrderBy(m => m.Id, StringComparer.Ordinal)];

    public IReadOnlyCollection<LibraryDefinition> Libraries => [.. _libraries.Values.OrderBy(l => l.Name, StringComparer.Ordinal)];

    public IReadOnlyCollection<ValueSetIndex> ValueSets => [.. _valueSets.Values.OrderBy(v => v.Id, StringComparer.Ordinal)];

    /// <summary>The files this repository was built from (loaded or not), so that a reload can add to them.</summary>
    public IReadOnlyList<DefinitionFile> Files { get; }

    public bool TryGetMeasure(string id, [NotNullWhen(true)] out MeasureDefinition? measure) => _measures.TryGetValue(id, out measure);

    public bool TryGetLibrary(string name, [NotNullWhen(true)] out LibraryDefinition? library) => _libraries.TryGetValue(name, out library);

    public bool TryGetValueSet(string id, [NotNullWhen(true)] out ValueSetIndex? valueSet) => _valueSets.TryGetValue(id, out valueSet);

    /// <summary>Loads every *.measure.json, *.library.json and valuesets/*.json under the directory.</summary>
    public static MeasureRepository Load(string measuresDirectory, out IReadOnlyList<DefinitionIssue> issues)
    {
        var files = new List<DefinitionFile>();
        foreach (var path in Directory.EnumerateFiles(measuresDirectory, "*.json", SearchOption.AllDirectories).Order(StringComparer.Ordinal))
        {
            var relative = Path.GetRelativePath(measuresDirectory, path);
            if (DefinitionFile.FromName(relative, File.ReadAllBytes(path)) is { } file)
            {
                files.Add(file);
            }
        }

        return Load(files, out issues);
    }

    /// <summary>Builds a repository from files; a later file with the same name replaces an earlier one.</summary>
    public static MeasureRepository Load(IEnumerable<DefinitionFile> files, out IReadOnlyList<DefinitionIssue> issues)
    {
        var byName = new Dictionary<string, DefinitionFile>(StringComparer.Ordinal);
        foreach (var file in files)
        {
            byName[file.Name] = file;
        }

        var ordered = byName.Values.OrderBy(f => f.Name, StringComparer.Ordinal).ToList();
        var all = new List<DefinitionIssue>();

        var valueSets = new Dictionary<string, ValueSetIndex>(StringComparer.Ordinal);
        var failedValueSets = new HashSet<string>(StringComparer.Ordinal);
        foreach (var file in ordered.Where(f => f.Kind == DefinitionFileKind.ValueSet))
        {
            var fileIssues = new List<DefinitionIssue>();
            if (ValueSetLoader.TryLoad(file.Name, file.Content, fileIssues, out var index) && index is not null)
            {
                if (!valueSets.TryAdd(index.Id, index))
                {
                    all.Add(new DefinitionIssue(file.Name, "$.id", $"value set id '{index.Id}' is used twice"));
                }
            }
            else
            {
                failedValueSets.Add(Path.GetFileNameWithoutExtension(file.Name));
                all.AddRange(fileIssues);
            }
        }

        var parsedLibraries = new Dictionary<string, ParsedFile>(StringComparer.Ordinal);
        foreach (var file in ordered.Where(f => f.Kind == DefinitionFileKind.Library))
        {
            if (Parse(file, all) is { } parsed)
            {
                if (!parsedLibraries.TryAdd(parsed.Id, parsed))
                {
                    all.Add(new DefinitionIssue(file.Name, "$.name", $"library name '{parsed.Id}' is used twice"));
                }
            }
        }

        var libraries = new Dictionary<string, LibraryDefinition>(StringComparer.Ordinal);
        var failedLibraries = new HashSet<string>(StringComparer.Ordinal);
        foreach (var name in parsedLibraries.Keys.Order(StringComparer.Ordinal))
        {
            ResolveLibrary(name, parsedLibraries, libraries, failedLibraries, valueSets, failedValueSets, all, []);
        }

        var measures = new Dictionary<string, MeasureDefinition>(StringComparer.Ordinal);
        foreach (var file in ordered.Where(f => f.Kind == DefinitionFileKind.Measure))
        {
            if (Parse(file, all) is not { } parsed)
            {
                continue;
            }

            var fileIssues = new List<DefinitionIssue>();
            var scope = Resolve(parsed, libraries, failedLibraries, valueSets, failedValueSets, fileIssues);
            if (fileIssues.Count > 0 || scope is null)
            {
                all.AddRange(fileIssues);
                continue;
            }

            var measure = new MeasureDefinition
            {
                Id = parsed.Id,
                Url = parsed.Url!,
                Version = parsed.Version,
                Name = parsed.Name!,
                Title = parsed.Title,
                Description = parsed.Description,
                ImprovementNotation = parsed.ImprovementNotation!,
                Populations = parsed.Populations,
                Definitions = parsed.Definitions,
                Stratifiers = parsed.Stratifiers,
                Sources = parsed.Sources,
                UnitConversions = scope.Value.Conversions,
                Libraries = scope.Value.Libraries,
                ValueSetIds = scope.Value.ValueSets,
                Content = file.Content,
                FileName = file.Name,
            };
            if (!measures.TryAdd(measure.Id, measure))
            {
                all.Add(new DefinitionIssue(file.Name, "$.id", $"measure id '{measure.Id}' is used twice"));
            }
        }

        issues = all;
        return new MeasureRepository(measures, libraries, valueSets, ordered);
    }

    private static void ResolveLibrary(
        string name, Dictionary<string, ParsedFile> parsed, Dictionary<string, LibraryDefinition> done, HashSet<string> failed,
        Dictionary<string, ValueSetIndex> valueSets, HashSet<string> failedValueSets, List<DefinitionIssue> issues, HashSet<string> visiting)
    {
        if (done.ContainsKey(name) || failed.Contains(name))
        {
            return;
        }

        var library = parsed[name];
        visiting.Add(name);
        for (var i = 0; i < library.Uses.Count; i++)
        {
            var used = library.Uses[i];
            if (visiting.Contains(used))
            {
                issues.Add(new DefinitionIssue(library.File.Name, $"$.uses[{i}]", $"libraries use each other in a cycle through '{used}'"));
                failed.Add(name);
                visiting.Remove(name);
                return;
            }

            if (parsed.ContainsKey(used))
            {
                ResolveLibrary(used, parsed, done, failed, valueSets, failedValueSets, issues, visiting);
            }
        }

        visiting.Remove(name);
        var fileIssues = new List<DefinitionIssue>();
        var scope = Resolve(library, done, failed, valueSets, failedValueSets, fileIssues);
        if (fileIssues.Count > 0 || scope is null)
        {
            issues.AddRange(fileIssues);
            failed.Add(name);
            return;
        }

        foreach (var definition in library.Definitions.Values)
        {
            definition.QualifiedName = $"{name}.{definition.Name}";
        }

        done[name] = new LibraryDefinition
        {
            Name = name,
            Version = library.Version,
            Url = library.Url,
            Uses = library.Uses,
            UnitConversions = scope.Value.Conversions,
            Definitions = library.Definitions,
            Content = library.File.Content,
            FileName = library.File.Name,
        };
    }

    private static (IReadOnlyList<UnitConversion> Conversions, IReadOnlyList<string> Libraries, IReadOnlyList<string> ValueSets)? Resolve(
        ParsedFile file, Dictionary<string, LibraryDefinition> libraries, HashSet<string> failedLibraries,
        Dictionary<string, ValueSetIndex> valueSets, HashSet<string> failedValueSets, List<DefinitionIssue> issues)
    {
        var name = file.File.Name;
        var conversions = new List<UnitConversion>(file.Conversions);
        var libraryNames = new SortedSet<string>(StringComparer.Ordinal);
        var valueSetIds = new SortedSet<string>(StringComparer.Ordinal);
        for (var i = 0; i < file.Uses.Count; i++)
        {
            var used = file.Uses[i];
            if (libraries.TryGetValue(used, out var library))
            {
                libraryNames.Add(used);
                CollectLibraries(library, libraries, libraryNames);
            }
            else
            {
                issues.Add(new DefinitionIssue(name, $"$.uses[{i}]", failedLibraries.Contains(used)
                    ? $"library '{used}' has errors and was not loaded"
                    : $"no library named '{used}'"));
            }
        }

        foreach (var used in libraryNames)
        {
            conversions.AddRange(libraries[used].UnitConversions.Where(c => !conversions.Contains(c)));
            foreach (var definition in libraries[used].Definitions.Values)
            {
                foreach (var vs in ValueSetsOf(definition.Body))
                {
                    valueSetIds.Add(vs);
                }
            }
        }

        foreach (var (id, path) in file.Parser.ValueSetReferences)
        {
            if (valueSets.ContainsKey(id))
            {
                valueSetIds.Add(id);
            }
            else
            {
                issues.Add(new DefinitionIssue(name, path, failedValueSets.Contains(id)
                    ? $"value set '{id}' has errors and was not loaded"
                    : $"no value set with id '{id}' (measures/valuesets/{id}.json)"));
            }
        }

        foreach (var reference in file.Parser.DefinitionReferences)
        {
            var dot = reference.Name.IndexOf('.', StringComparison.Ordinal);
            if (dot < 0)
            {
                if (file.Definitions.TryGetValue(reference.Name, out var own))
                {
                    reference.Target = own;
                }
                else
                {
                    issues.Add(new DefinitionIssue(name, $"{reference.Path}.definition", $"no definition named '{reference.Name}' in this file"));
                }

                continue;
            }

            var libraryName = reference.Name[..dot];
            var definitionName = reference.Name[(dot + 1)..];
            if (!file.Uses.Contains(libraryName))
            {
                issues.Add(new DefinitionIssue(name, $"{reference.Path}.definition", $"'{libraryName}' is not in this file's 'uses'"));
            }
            else if (libraries.TryGetValue(libraryName, out var library))
            {
                if (library.Definitions.TryGetValue(definitionName, out var target))
                {
                    reference.Target = target;
                }
                else
                {
                    issues.Add(new DefinitionIssue(name, $"{reference.Path}.definition", $"library '{libraryName}' has no definition '{definitionName}'"));
                }
            }
        }

        if (issues.Count == 0)
        {
            foreach (var definition in file.Definitions.Values)
            {
                if (FindCycle(definition, []) is { } cycle)
                {
                    issues.Add(new DefinitionIssue(name, definition.Path, $"definitions refer to each other in a cycle: {cycle}"));
                }
            }
        }

        // Every retrieve gets its value sets attached once all references are known to exist.
        if (issues.Count == 0)
        {
            foreach (var retrieve in file.Retrieves)
            {
                if (retrieve.ValueSetId is { } vs)
                {
                    retrieve.ValueSet = valueSets[vs];
                }

                if (retrieve.ComponentValueSetId is { } cvs)
                {
                    retrieve.ComponentValueSet = valueSets[cvs];
                }
            }
        }

        return issues.Count == 0 ? (conversions, [.. libraryNames], [.. valueSetIds]) : null;
    }

    private static void CollectLibraries(LibraryDefinition library, Dictionary<string, LibraryDefinition> libraries, SortedSet<string> into)
    {
        foreach (var used in library.Uses)
        {
            if (libraries.TryGetValue(used, out var inner) && into.Add(used))
            {
                CollectLibraries(inner, libraries, into);
            }
        }
    }

    private static string? FindCycle(NamedDefinition definition, List<NamedDefinition> stack)
    {
        if (stack.Contains(definition))
        {
            return string.Join(" → ", stack.Append(definition).Select(d => d.QualifiedName));
        }

        stack.Add(definition);
        foreach (var reference in DefinitionParser.AllCriteria(definition.Body).OfType<DefinitionCriterion>())
        {
            if (reference.Target is { } target && FindCycle(target, stack) is { } cycle)
            {
                return cycle;
            }
        }

        stack.RemoveAt(stack.Count - 1);
        return null;
    }

    private static IEnumerable<string> ValueSetsOf(Criterion criterion) =>
        DefinitionParser.AllRetrieves(criterion).SelectMany(r => new[] { r.ValueSetId, r.ComponentValueSetId }).OfType<string>();

    private sealed class ParsedFile
    {
        public required DefinitionFile File { get; init; }

        public required DefinitionParser Parser { get; init; }

        public required string Id { get; init; }

        public string? Url { get; init; }

        public required string Version { get; init; }

        public string? Name { get; init; }

        public string? Title { get; init; }

        public string? Description { get; init; }

        public string? ImprovementNotation { get; init; }

        public required IReadOnlyList<string> Uses { get; init; }

        public required IReadOnlyList<UnitConversion> Conversions { get; init; }

        public required Dictionary<string, NamedDefinition> Definitions { get; init; }

        public Dictionary<PopulationKind, Criterion> Populations { get; init; } = [];

        public IReadOnlyList<StratifierDefinition> Stratifiers { get; init; } = [];

        public IReadOnlyList<string> Sources { get; init; } = [];

        public required IReadOnlyList<Retrieve> Retrieves { get; init; }
    }

    private static ParsedFile? Parse(DefinitionFile file, List<DefinitionIssue> issues)
    {
        var fileIssues = new List<DefinitionIssue>();
        JsonDocument document;
        try
        {
            document = JsonDocument.Parse(file.Content, new JsonDocumentOptions { AllowTrailingCommas = false, CommentHandling = JsonCommentHandling.Disallow });
        }
        catch (JsonException ex)
        {
            issues.Add(new DefinitionIssue(file.Name, "$", $"not valid JSON (line {(ex.LineNumber ?? 0) + 1}, position {(ex.BytePositionInLine ?? 0) + 1}): {ex.Message}"));
            return null;
        }

        using (document)
        {
            var p = new DefinitionParser(file.Name, fileIssues, FhirPath);
            var root = document.RootElement;
            if (root.ValueKind != JsonValueKind.Object)
            {
                issues.Add(new DefinitionIssue(file.Name, "$", "a definition file is a JSON object"));
                return null;
            }

            var isMeasure = file.Kind == DefinitionFileKind.Measure;
            if (isMeasure)
            {
                p.CheckKeys(root, "$", "format", "kind", "id", "url", "version", "name", "title", "description", "scoring", "improvementNotation",
                    "uses", "unitConversions", "definitions", "populations", "stratifiers", "sources");
            }
            else
            {
                p.CheckKeys(root, "$", "format", "kind", "name", "url", "version", "description", "uses", "unitConversions", "definitions", "sources");
            }

            if (p.String(root, "format", "$", required: true) is { } format && format != DefinitionParser.FormatTag)
            {
                p.Error("$.format", $"unsupported format '{format}' (expected '{DefinitionParser.FormatTag}')");
            }

            var expectedKind = isMeasure ? "measure" : "library";
            if (p.String(root, "kind", "$", required: true) is { } kind && kind != expectedKind)
            {
                p.Error("$.kind", $"a {(isMeasure ? ".measure.json" : ".library.json")} file has kind '{expectedKind}'");
            }

            var id = isMeasure ? p.String(root, "id", "$", required: true) : p.String(root, "name", "$", required: true);
            var expectedId = Path.GetFileName(file.Name).Split('.')[0];
            if (id is not null && id != expectedId)
            {
                p.Error(isMeasure ? "$.id" : "$.name", $"'{id}' must match the file name '{expectedId}'");
            }

            if (id is not null && !IdRegex().IsMatch(id))
            {
                p.Error(isMeasure ? "$.id" : "$.name", "must be a FHIR id: letters, digits, '-' (at most 64)");
            }

            var url = p.String(root, "url", "$", required: isMeasure);
            var version = p.String(root, "version", "$", required: true) ?? "";
            var name = isMeasure ? p.String(root, "name", "$", required: true) : id;
            var title = p.String(root, "title", "$", required: false);
            var description = p.String(root, "description", "$", required: false);
            string? improvement = null;
            if (isMeasure)
            {
                improvement = p.String(root, "improvementNotation", "$", required: true);
                if (improvement is not null and not ("increase" or "decrease"))
                {
                    p.Error("$.improvementNotation", "'increase' or 'decrease'");
                }

                if (p.String(root, "scoring", "$", required: false) is { } scoring && scoring != "proportion")
                {
                    p.Error("$.scoring", "only 'proportion' measures are supported");
                }
            }

            var uses = p.Strings(root, "uses", "$");
            var conversions = Conversions(p, root);
            var owner = id ?? expectedId;
            var definitions = new Dictionary<string, NamedDefinition>(StringComparer.Ordinal);
            if (root.TryGetProperty("definitions", out var defs))
            {
                if (defs.ValueKind != JsonValueKind.Object)
                {
                    p.Error("$.definitions", "must be an object of named criteria");
                }
                else
                {
                    foreach (var property in defs.EnumerateObject())
                    {
                        var dpath = $"$.definitions.{property.Name}";
                        if (property.Name.Contains('.', StringComparison.Ordinal) || string.IsNullOrWhiteSpace(property.Name))
                        {
                            p.Error(dpath, "a definition name has no dots");
                            continue;
                        }

                        if (p.Criterion(property.Value, dpath, insideThen: false) is { } body)
                        {
                            definitions[property.Name] = new NamedDefinition(owner, property.Name, body, dpath);
                        }
                    }
                }
            }

            var populations = new Dictionary<PopulationKind, Criterion>();
            var stratifiers = new List<StratifierDefinition>();
            if (isMeasure)
            {
                if (!root.TryGetProperty("populations", out var pops) || pops.ValueKind != JsonValueKind.Object)
                {
                    p.Error("$.populations", "a measure needs populations (at least initial-population and numerator)");
                }
                else
                {
                    foreach (var property in pops.EnumerateObject())
                    {
                        var ppath = $"$.populations.{property.Name}";
                        if (!PopulationKinds.TryParse(property.Name, out var population))
                        {
                            p.Error(ppath, "one of: initial-population, denominator, denominator-exclusion, denominator-exception, numerator");
                        }
                        else if (p.Criterion(property.Value, ppath, insideThen: false) is { } criterion)
                        {
                            populations[population] = criterion;
                        }
                    }

                    foreach (var required in new[] { PopulationKind.InitialPopulation, PopulationKind.Numerator })
                    {
                        if (!pops.TryGetProperty(required.Code(), out _))
                        {
                            p.Error("$.populations", $"'{required.Code()}' is required");
                        }
                    }
                }

                stratifiers = Stratifiers(p, root);
            }

            var sources = p.Strings(root, "sources", "$");
            if (fileIssues.Count > 0)
            {
                issues.AddRange(fileIssues);
                return null;
            }

            var roots = definitions.Values.Select(d => d.Body).Concat(populations.Values);
            return new ParsedFile
            {
                File = file,
                Parser = p,
                Id = id!,
                Url = url,
                Version = version,
                Name = name,
                Title = title,
                Description = description,
                ImprovementNotation = improvement,
                Uses = uses,
                Conversions = conversions,
                Definitions = definitions,
                Populations = populations,
                Stratifiers = stratifiers,
                Sources = sources,
                Retrieves = [.. roots.SelectMany(DefinitionParser.AllRetrieves)],
            };
        }
    }

    private static List<UnitConversion> Conversions(DefinitionParser p, JsonElement root)
    {
        var result = new List<UnitConversion>();
        if (!root.TryGetProperty("unitConversions", out var list))
        {
            return result;
        }

        if (list.ValueKind != JsonValueKind.Array)
        {
            p.Error("$.unitConversions", "must be a list");
            return result;
        }

        var i = 0;
        foreach (var item in list.EnumerateArray())
        {
            var path = $"$.unitConversions[{i++}]";
            if (item.ValueKind != JsonValueKind.Object)
            {
                p.Error(path, "must be an object");
                continue;
            }

            p.CheckKeys(item, path, "from", "to", "multiply", "add", "source");
            var from = p.String(item, "from", path, required: true);
            var to = p.String(item, "to", path, required: true);
            var source = p.String(item, "source", path, required: true);
            var multiply = Number(p, item, "multiply", path, 1m);
            var add = Number(p, item, "add", path, 0m);
            if (multiply <= 0)
            {
                p.Error($"{path}.multiply", "must be positive (a conversion keeps the order of values)");
            }

            if (from is not null && to is not null && source is not null)
            {
                result.Add(new UnitConversion(from, to, multiply, add, source));
            }
        }

        return result;
    }

    private static decimal Number(DefinitionParser p, JsonElement item, string key, string path, decimal fallback)
    {
        if (!item.TryGetProperty(key, out var value))
        {
            return fallback;
        }

        if (value.ValueKind != JsonValueKind.Number || !value.TryGetDecimal(out var number))
        {
            p.Error($"{path}.{key}", "must be a number");
            return fallback;
        }

        return number;
    }

    private static List<StratifierDefinition> Stratifiers(DefinitionParser p, JsonElement root)
    {
        var result = new List<StratifierDefinition>();
        if (!root.TryGetProperty("stratifiers", out var list))
        {
            return result;
        }

        if (list.ValueKind != JsonValueKind.Array)
        {
            p.Error("$.stratifiers", "must be a list");
            return result;
        }

        var ids = new HashSet<string>(StringComparer.Ordinal);
        var i = 0;
        foreach (var item in list.EnumerateArray())
        {
            var path = $"$.stratifiers[{i++}]";
            if (item.ValueKind != JsonValueKind.Object)
            {
                p.Error(path, "must be an object");
                continue;
            }

            p.CheckKeys(item, path, "id", "by", "ageBands", "description");
            var id = p.String(item, "id", path, required: true);
            if (id is not null && !ids.Add(id))
            {
                p.Error($"{path}.id", $"stratifier id '{id}' is used twice");
            }

            var description = p.String(item, "description", path, required: false);
            var by = p.String(item, "by", path, required: false);
            var hasBands = item.TryGetProperty("ageBands", out var bands);
            if ((by is null) == !hasBands)
            {
                p.Error(path, "a stratifier has exactly one of 'by' (gender, payer, panel) or 'ageBands'");
                continue;
            }

            if (id is null)
            {
                continue;
            }

            if (by is not null)
            {
                StratifierKind? kind = by switch { "gender" => StratifierKind.Gender, "payer" => StratifierKind.Payer, "panel" => StratifierKind.Panel, _ => null };
                if (kind is null)
                {
                    p.Error($"{path}.by", "one of: gender, payer, panel");
                }
                else
                {
                    result.Add(new StratifierDefinition(id, kind.Value, description));
                }

                continue;
            }

            var bpath = $"{path}.ageBands";
            if (bands.ValueKind != JsonValueKind.Object)
            {
                p.Error(bpath, "must be {\"on\": <date>, \"bands\": [\"45-49\", …]}");
                continue;
            }

            p.CheckKeys(bands, bpath, "on", "bands");
            var onText = p.String(bands, "on", bpath, required: true);
            DateExpression? on = null;
            if (onText is not null)
            {
                if (!DefinitionParser.TryParseDate(onText, out var parsed, out var problem) || parsed.Anchor is DateAnchor.Record or DateAnchor.BirthDate)
                {
                    p.Error($"{bpath}.on", problem.Length > 0 ? problem : "age bands are taken on a date of the period");
                }
                else
                {
                    on = parsed;
                }
            }

            var parsedBands = new List<AgeBand>();
            var labels = p.Strings(bands, "bands", bpath);
            for (var b = 0; b < labels.Count; b++)
            {
                if (ParseBand(labels[b]) is { } band)
                {
                    parsedBands.Add(band);
                }
                else
                {
                    p.Error($"{bpath}.bands[{b}]", $"'{labels[b]}' is not a band: \"a-b\", \"a+\" or \"<a\" in whole years");
                }
            }

            if (labels.Count == 0)
            {
                p.Error($"{bpath}.bands", "list at least one band");
            }

            for (var b = 1; b < parsedBands.Count; b++)
            {
                if ((parsedBands[b - 1].High ?? int.MaxValue) >= (parsedBands[b].Low ?? int.MinValue))
                {
                    p.Error($"{bpath}.bands[{b}]", "bands must be in ascending order and must not overlap");
                }
            }

            if (on is not null)
            {
                result.Add(new StratifierDefinition(id, StratifierKind.AgeBand, description) { AgeOn = on, Bands = parsedBands });
            }
        }

        return result;
    }

    private static AgeBand? ParseBand(string text)
    {
        var t = text.Trim();
        if (t.StartsWith('<') && int.TryParse(t[1..], NumberStyles.None, CultureInfo.InvariantCulture, out var below) && below > 0)
        {
            return new AgeBand(t, null, below - 1);
        }

        if (t.EndsWith('+') && int.TryParse(t[..^1], NumberStyles.None, CultureInfo.InvariantCulture, out var from))
        {
            return new AgeBand(t, from, null);
        }

        var dash = t.IndexOf('-', StringComparison.Ordinal);
        if (dash > 0 && int.TryParse(t[..dash], NumberStyles.None, CultureInfo.InvariantCulture, out var low)
            && int.TryParse(t[(dash + 1)..], NumberStyles.None, CultureInfo.InvariantCulture, out var high) && low <= high)
        {
            return new AgeBand(t, low, high);
        }

        return null;
    }

    [System.Text.RegularExpressions.GeneratedRegex("^[A-Za-z0-9\\-]{1,64}$")]
    private static partial System.Text.RegularExpressions.Regex IdRegex();
}
