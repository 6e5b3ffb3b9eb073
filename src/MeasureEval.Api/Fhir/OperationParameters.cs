using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.Fhir;

/// <summary>An operation's input parameter as text, whichever way it arrived, with its FHIRPath location.</summary>
public readonly record struct OperationParameter(string Name, string Value, string Location);

public static class OperationParameters
{
    /// <summary>
    /// The parameters of a POSTed Parameters resource as text (dates, codes, strings, references). Each parameter without a
    /// usable value[x] becomes an issue with <paramref name="invalidParameter"/>, and reading goes on.
    /// </summary>
    public static List<OperationParameter> Read(Parameters body, ErrorCode invalidParameter, List<FhirIssue> issues)
    {
        ArgumentNullException.ThrowIfNull(body);
        ArgumentNullException.ThrowIfNull(issues);
        var values = new List<OperationParameter>();
        for (var i = 0; i < body.Parameter.Count; i++)
        {
            var parameter = body.Parameter[i];
            var location = $"Parameters.parameter[{i}]";
            var text = parameter.Value switch
            {
                ResourceReference reference => reference.Reference,
                Date date => date.Value,
                FhirDateTime dateTime => dateTime.Value,
                PrimitiveType primitive => primitive.JsonValue?.ToString(),
                _ => null,
            };
            if (text is null)
            {
                issues.Add(new FhirIssue(invalidParameter, $"parameter '{parameter.Name}' needs a value[x] (date, string, code or Reference)", location));
                continue;
            }

            values.Add(new OperationParameter(parameter.Name ?? "", text, location));
        }

        return values;
    }
}
