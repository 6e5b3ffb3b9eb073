using Hl7.Fhir.Model;
using Hl7.Fhir.Serialization;
using Hl7.Fhir.Utility;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Engine;

/// <summary>
/// Reads a FHIR R4 ValueSet into a <see cref="ValueSetIndex"/>. A pre-computed expansion, when present, is the value set;
/// otherwise compose.include concept lists and ICD-10-CM is-a filters are. compose.exclude and other filters are refused
/// rather than silently ignored.
/// </summary>
public static class ValueSetLoader
{
    public static bool TryLoad(string fileName, byte[] content, List<DefinitionIssue> issues, out ValueSetIndex? index)
    {
        index = null;
        var before = issues.Count;
        ValueSet valueSet;
        try
        {
            valueSet = FhirJson.Deserializer.Deserialize<ValueSet>(System.Text.Encoding.UTF8.GetString(content));
        }
        catch (DeserializationFailedException ex)
        {
            foreach (var inner in ex.Exceptions)
            {
                var path = inner is ExtendedCodedException coded ? ToJsonPath(coded.InstancePath) : "$";
                issues.Add(new DefinitionIssue(fileName, path, inner.Message));
            }

            return false;
        }
        catch (System.Text.Json.JsonException ex)
        {
            issues.Add(new DefinitionIssue(fileName, "$", $"not valid JSON (line {(ex.LineNumber ?? 0) + 1}): {ex.Message}"));
            return false;
        }
        catch (FormatException ex)
        {
            issues.Add(new DefinitionIssue(fileName, "$", ex.Message));
            return false;
        }

        if (string.IsNullOrEmpty(valueSet.Id))
        {
            issues.Add(new DefinitionIssue(fileName, "$.id", "a value set needs an id"));
        }
        else if (Path.GetFileNameWithoutExtension(fileName) != valueSet.Id)
        {
            issues.Add(new DefinitionIssue(fileName, "$.id", $"id '{valueSet.Id}' must match the file name"));
        }

        if (string.IsNullOrEmpty(valueSet.Url))
        {
            issues.Add(new DefinitionIssue(fileName, "$.url", "a value set needs a canonical url"));
        }

        if (string.IsNullOrWhiteSpace(valueSet.Description) && valueSet.Purpose is null && valueSet.Copyright is null)
        {
            issues.Add(new DefinitionIssue(fileName, "$.description", "say where the codes come from (description, purpose or copyright)"));
        }

        var exact = new List<(string, string)>();
        var isA = new List<string>();
        if (valueSet.Expansion is { } expansion)
        {
            ReadContains(fileName, expansion.Contains, "$.expansion.contains", exact, issues);
        }
        else if (valueSet.Compose is { } compose)
        {
            if (compose.Exclude.Count > 0)
            {
                issues.Add(new DefinitionIssue(fileName, "$.compose.exclude", "compose.exclude is not supported: list the codes that belong"));
            }

            for (var i = 0; i < compose.Include.Count; i++)
            {
                ReadInclude(fileName, compose.Include[i], $"$.compose.include[{i}]", exact, isA, issues);
            }
        }
        else
        {
            issues.Add(new DefinitionIssue(fileName, "$", "a value set needs compose.include or an expansion"));
        }

        if (issues.Count > before)
        {
            return false;
        }

        index = new ValueSetIndex(valueSet.Id!, valueSet.Url!, valueSet.Version, exact, isA, content);
        return true;
    }

    private static void ReadInclude(string file, ValueSet.ConceptSetComponent include, string path, List<(string, string)> exact, List<string> isA, List<DefinitionIssue> issues)
    {
        if (include.ValueSet.Any())
        {
            issues.Add(new DefinitionIssue(file, $"{path}.valueSet", "including other value sets is not supported: list the codes"));
        }

        var system = include.System;
        if (string.IsNullOrEmpty(system))
        {
            issues.Add(new DefinitionIssue(file, $"{path}.system", "an include needs a code system"));
            return;
        }

        if (!CodeSystems.Known.Contains(system))
        {
            issues.Add(new DefinitionIssue(file, $"{path}.system", $"unknown code system '{system}'"));
            return;
        }

        for (var c = 0; c < include.Concept.Count; c++)
        {
            var code = include.Concept[c].Code;
            if (string.IsNullOrWhiteSpace(code))
            {
                issues.Add(new DefinitionIssue(file, $"{path}.concept[{c}].code", "a concept needs a code"));
                continue;
            }

            exact.Add((system, code));
        }

        if (include.Filter.Count > 1)
        {
            issues.Add(new DefinitionIssue(file, $"{path}.filter", "filters in one include all have to hold; put each is-a filter in its own include"));
            return;
        }

        for (var f = 0; f < include.Filter.Count; f++)
        {
            var filter = include.Filter[f];
            var fpath = $"{path}.filter[{f}]";
            if (system != CodeSystems.Icd10Cm)
            {
                issues.Add(new DefinitionIssue(file, fpath, "filters are supported on ICD-10-CM only (no SNOMED CT descendants are used)"));
            }
            else if (filter.Property != "concept" || filter.Op != FilterOperator.IsA)
            {
                issues.Add(new DefinitionIssue(file, fpath, "only the filter property 'concept' with op 'is-a' is supported"));
            }
            else if (string.IsNullOrWhiteSpace(filter.Value))
            {
                issues.Add(new DefinitionIssue(file, $"{fpath}.value", "an is-a filter needs a code"));
            }
            else
            {
                isA.Add(filter.Value);
            }
        }
    }

    private static void ReadContains(string file, List<ValueSet.ContainsComponent> contains, string path, List<(string, string)> exact, List<DefinitionIssue> issues)
    {
        for (var i = 0; i < contains.Count; i++)
        {
            var entry = contains[i];
            var epath = $"{path}[{i}]";
            if (entry.Code is { } code)
            {
                if (string.IsNullOrEmpty(entry.System) || !CodeSystems.Known.Contains(entry.System))
                {
                    issues.Add(new DefinitionIssue(file, $"{epath}.system", $"unknown code system '{entry.System}'"));
                }
                else
                {
                    exact.Add((entry.System, code));
                }
            }

            ReadContains(file, entry.Contains, $"{epath}.contains", exact, issues);
        }
    }

    /// <summary>"ValueSet.compose.include[0].system" → "$.compose.include[0].system".</summary>
    internal static string ToJsonPath(string? instancePath)
    {
        if (string.IsNullOrEmpty(instancePath))
        {
            return "$";
        }

        var dot = instancePath.IndexOf('.', StringComparison.Ordinal);
        return dot < 0 ? "$" : "$" + instancePath[dot..];
    }
}
