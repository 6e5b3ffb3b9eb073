using System.Net.Http.Headers;
using System.Text;
using Hl7.Fhir.Model;
using Hl7.Fhir.Serialization;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Api.Tests.Support;

/// <summary>Small helpers to send FHIR JSON and read FHIR answers in tests.</summary>
public static class Fhir
{
    public const string ErrorSystem = "http://measureeval.example.org/fhir/CodeSystem/error-code";

    public static string Input(string relativePath) => File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "Inputs", relativePath));

    public static StringContent Json(string json, string mediaType = "application/fhir+json")
    {
        var content = new StringContent(json, Encoding.UTF8);
        content.Headers.ContentType = MediaTypeHeaderValue.Parse(mediaType);
        return content;
    }

    public static StringContent Json(Resource resource) => Json(FhirJson.Serialize(resource));

    public static async Task<T> ReadAsync<T>(HttpResponseMessage response) where T : Resource
    {
        ArgumentNullException.ThrowIfNull(response);
        var text = await response.Content.ReadAsStringAsync();
        return FhirJson.Deserializer.DeserializeResource(text) as T
            ?? throw new InvalidOperationException($"Expected a {typeof(T).Name}, got: {text}");
    }

    /// <summary>The MEV code of each issue, in order.</summary>
    public static IReadOnlyList<string> Codes(OperationOutcome outcome) =>
        [.. outcome.Issue.Select(i => i.Details?.Coding.FirstOrDefault(c => c.System == ErrorSystem)?.Code ?? "(none)")];

    public static OperationOutcome.IssueComponent Issue(OperationOutcome outcome, string code) =>
        outcome.Issue.First(i => i.Details?.Coding.Any(c => c.System == ErrorSystem && c.Code == code) == true);

    public static int? Line(OperationOutcome.IssueComponent issue) =>
        (issue.GetExtension("http://hl7.org/fhir/StructureDefinition/operationoutcome-issue-line")?.Value as Integer)?.Value;

    public static Parameters.ParameterComponent Param(Parameters parameters, string name) =>
        parameters.Parameter.Single(p => p.Name == name);

    public static Patient Patient(string? id = null, string? identifier = null)
    {
        var patient = new Patient { Id = id, Gender = AdministrativeGender.Female, BirthDate = "1975-04-12" };
        patient.Name.Add(new HumanName { Family = "Okafor", Given = ["Ada"] });
        if (identifier is not null)
        {
            patient.Identifier.Add(new Identifier("http://riverbend.example.org/mrn", identifier));
        }

        return patient;
    }
}
