using System.Globalization;
using System.Text.RegularExpressions;
using MeasureEval.Api.Errors;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.Extensions.Primitives;

namespace MeasureEval.Api.Search;

/// <summary>
/// A parsed search: the store query, the recognised parameters (echoed in paging links), warnings for ignored
/// parameters, and whether the criteria contradict each other (two different patients, disjoint _id lists).
/// </summary>
public sealed record ParsedSearch(SearchQuery Query, IReadOnlyList<KeyValuePair<string, string>> Recognized, IReadOnlyList<FhirIssue> Warnings, bool MatchesNothing);

/// <summary>Turns FHIR search parameters into a <see cref="SearchQuery"/>, collecting every problem.</summary>
public static partial class SearchRequestParser
{
    /// <summary>Parameters handled by format negotiation, not by search.</summary>
    private static readonly HashSet<string> FormatParameters = new(StringComparer.Ordinal) { "_format", "_pretty" };

    public static bool TryParse(
        string resourceType,
        IEnumerable<KeyValuePair<string, StringValues>> parameters,
        DataScope scope,
        SearchOptions options,
        bool strict,
        out ParsedSearch? parsed,
        out IReadOnlyList<FhirIssue> issues)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(options);
        var errors = new List<FhirIssue>();
        var warnings = new List<FhirIssue>();
        var recognized = new List<KeyValuePair<string, string>>();
        HashSet<string>? ids = null;
        var ranges = new List<InstantRange>();
        var excluded = new List<InstantRange>();
        string? patientId = null;
        List<TokenValue>? identifiers = null;
        var count = options.DefaultPageSize;
        var offset = 0;
        var nothing = false;

        foreach (var (rawName, values) in parameters)
        {
            if (FormatParameters.Contains(rawName))
            {
                continue;
            }

            var colon = rawName.IndexOf(':', StringComparison.Ordinal);
            var name = colon < 0 ? rawName : rawName[..colon];
            var modifier = colon < 0 ? null : rawName[(colon + 1)..];
            foreach (var value in values.Select(v => v ?? ""))
            {
                if (name is "_count" or "_offset")
                {
                    if (modifier is not null || !int.TryParse(value, NumberStyles.None, CultureInfo.InvariantCulture, out var number))
                    {
                        errors.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"{rawName} must be a non-negative integer, got '{value}'.", rawName));
                        continue;
                    }

                    if (name == "_count")
                    {
                        count = Math.Min(number, options.MaxPageSize);
                    }
                    else
                    {
                        offset = number;
                    }

                    continue;
                }

                var definition = SearchParameterRegistry.Find(resourceType, name);
                if (definition is null)
                {
                    var unknown = new FhirIssue(
                        strict ? ErrorCatalogue.UnknownSearchParameter with { Severity = Hl7.Fhir.Model.OperationOutcome.IssueSeverity.Error } : ErrorCatalogue.UnknownSearchParameter,
                        strict ? $"Search parameter '{rawName}' is not supported for {resourceType} (Prefer: handling=strict)." : $"Search parameter '{rawName}' is not supported for {resourceType} and was ignored.",
                        rawName);
                    (strict ? errors : warnings).Add(unknown);
                    break;
                }

                if (modifier is not null)
                {
                    errors.Add(new FhirIssue(ErrorCatalogue.UnsupportedSearchForm, $"Modifier ':{modifier}' is not supported on '{name}'.", rawName));
                    break;
                }

                recognized.Add(new(name, value));
                switch (definition.Kind)
                {
                    case SearchParameterKind.Id:
                        var these = value.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).ToHashSet(StringComparer.Ordinal);
                        if (ids is null)
                        {
                            ids = these;
                        }
                        else
                        {
                            ids.IntersectWith(these);
                        }

                        break;
                    case SearchParameterKind.LastUpdated:
                        ParseLastUpdated(name, value, ranges, excluded, errors);
                        break;
                    case SearchParameterKind.PatientReference:
                        if (TryPatientId(name, value, errors, out var pid))
                        {
                            nothing |= patientId is not null && patientId != pid;
                            patientId = pid;
                        }

                        break;
                    case SearchParameterKind.Identifier:
                        if (identifiers is not null)
                        {
                            errors.Add(new FhirIssue(ErrorCatalogue.UnsupportedSearchForm, "Repeating 'identifier' (AND) is not supported; use comma-separated alternatives.", name));
                            break;
                        }

                        identifiers = [.. value.Split(',', StringSplitOptions.RemoveEmptyEntries).Select(ParseToken)];
                        break;
                }
            }
        }

        nothing |= ids is { Count: 0 };
        issues = errors.Count > 0 ? errors : warnings;
        if (errors.Count > 0)
        {
            parsed = null;
            return false;
        }

        var query = new SearchQuery(resourceType)
        {
            Scope = scope,
            Ids = ids is null ? null : [.. ids.Order(StringComparer.Ordinal)],
            LastUpdated = ranges.Count > 0 ? ranges : null,
            LastUpdatedNotIn = excluded.Count > 0 ? excluded : null,
            PatientId = patientId,
            Identifiers = identifiers,
            Count = count,
            Offset = offset,
        };
        parsed = new ParsedSearch(query, recognized, warnings, nothing);
        return true;
    }

    private static TokenValue ParseToken(string text)
    {
        var bar = text.IndexOf('|', StringComparison.Ordinal);
        return bar < 0 ? new TokenValue(null, text) : new TokenValue(text[..bar], text[(bar + 1)..]);
    }

    private static bool TryPatientId(string name, string value, List<FhirIssue> errors, out string patientId)
    {
        patientId = "";
        if (value.Contains(',', StringComparison.Ordinal))
        {
            errors.Add(new FhirIssue(ErrorCatalogue.UnsupportedSearchForm, $"'{name}' takes one patient; alternatives are not supported.", name));
            return false;
        }

        var text = value.Trim();
        var slash = text.LastIndexOf('/');
        if (slash >= 0)
        {
            var typePart = text[..slash];
            var typeStart = typePart.LastIndexOf('/');
            var type = typeStart < 0 ? typePart : typePart[(typeStart + 1)..];
            if (type != "Patient")
            {
                errors.Add(new FhirIssue(ErrorCatalogue.UnsupportedSearchForm, $"'{name}' supports Patient references only, got a {type} reference.", name));
                return false;
            }

            text = text[(slash + 1)..];
        }

        if (!IdPattern().IsMatch(text))
        {
            errors.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"'{name}' must name a patient id (Patient/id or id).", name));
            return false;
        }

        patientId = text;
        return true;
    }

    private static void ParseLastUpdated(string name, string value, List<InstantRange> ranges, List<InstantRange> excluded, List<FhirIssue> errors)
    {
        var prefix = value.Length >= 2 && char.IsAsciiLetterLower(value[0]) && char.IsAsciiLetterLower(value[1]) ? value[..2] : "eq";
        var dateText = value.Length >= 2 && char.IsAsciiLetterLower(value[0]) ? value[2..] : value;
        if (!SearchDateRange.TryParse(dateText, out var start, out var end))
        {
            errors.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"'{value}' is not a FHIR search date (YYYY, YYYY-MM, YYYY-MM-DD or a dateTime), optionally after a prefix.", name));
            return;
        }

        // The target is an instant, so "starts after"/"ends before" coincide with gt/lt (FHIR R4 search, prefixes).
        switch (prefix)
        {
            case "eq": ranges.Add(new InstantRange(start, end)); break;
            case "ne": excluded.Add(new InstantRange(start, end)); break;
            case "gt" or "sa": ranges.Add(new InstantRange(end, null)); break;
            case "ge": ranges.Add(new InstantRange(start, null)); break;
            case "lt" or "eb": ranges.Add(new InstantRange(null, start)); break;
            case "le": ranges.Add(new InstantRange(null, end)); break;
            default:
                errors.Add(new FhirIssue(ErrorCatalogue.UnsupportedSearchForm, $"Prefix '{prefix}' is not supported on {name}; use eq, ne, gt, lt, ge, le, sa or eb.", name));
                break;
        }
    }

    [GeneratedRegex("^[A-Za-z0-9\\-\\.]{1,64}$")]
    private static partial Regex IdPattern();
}
