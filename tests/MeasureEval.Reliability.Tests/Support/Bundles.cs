using System.Net.Http.Headers;
using System.Text;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>Transaction bundles of invented Riverbend Community Health patients, built as JSON text.</summary>
public static class Bundles
{
    public const string MrnSystem = "http://riverbend.example.org/mrn";

    /// <summary>A transaction that PUTs Patient/{prefix} and <paramref name="observations"/> Observations {prefix}-o{k} referencing it.</summary>
    public static string PutTransaction(string prefix, int observations)
    {
        var entries = new List<string>
        {
            $$$"""{"fullUrl":"http://riverbend.example.org/fhir/Patient/{{{prefix}}}","resource":{"resourceType":"Patient","id":"{{{prefix}}}","gender":"female","birthDate":"1968-03-02","identifier":[{"system":"{{{MrnSystem}}}","value":"{{{prefix}}}"}]},"request":{"method":"PUT","url":"Patient/{{{prefix}}}"}}""",
        };
        for (var k = 0; k < observations; k++)
        {
            entries.Add($$$"""{"resource":{"resourceType":"Observation","id":"{{{prefix}}}-o{{{k}}}","status":"final","code":{"coding":[{"system":"http://loinc.org","code":"4548-4"}]},"subject":{"reference":"Patient/{{{prefix}}}"},"effectiveDateTime":"2024-05-0{{{1 + (k % 9)}}}","valueQuantity":{"value":7.{{{k}}},"unit":"%","system":"http://unitsofmeasure.org","code":"%"}},"request":{"method":"PUT","url":"Observation/{{{prefix}}}-o{{{k}}}"}}""");
        }

        return """{"resourceType":"Bundle","type":"transaction","entry":[""" + string.Join(",", entries) + "]}";
    }

    /// <summary>A transaction that conditionally creates the patient with MRN <paramref name="mrn"/> and PUTs one Observation referencing it.</summary>
    public static string ConditionalTransaction(string mrn, string observationId) =>
        $$$"""
        {"resourceType":"Bundle","type":"transaction","entry":[
          {"fullUrl":"urn:uuid:6a1e2f4c-0000-4000-8000-000000000001","resource":{"resourceType":"Patient","gender":"male","birthDate":"1959-11-20","identifier":[{"system":"{{{MrnSystem}}}","value":"{{{mrn}}}"}]},"request":{"method":"POST","url":"Patient","ifNoneExist":"identifier={{{MrnSystem}}}|{{{mrn}}}"}},
          {"resource":{"resourceType":"Observation","id":"{{{observationId}}}","status":"final","code":{"coding":[{"system":"http://loinc.org","code":"8480-6"}]},"subject":{"reference":"urn:uuid:6a1e2f4c-0000-4000-8000-000000000001"},"effectiveDateTime":"2024-06-11","valueQuantity":{"value":128,"unit":"mm[Hg]","system":"http://unitsofmeasure.org","code":"mm[Hg]"}},"request":{"method":"PUT","url":"Observation/{{{observationId}}}"}}
        ]}
        """;

    public static ByteArrayContent Content(string json) => Content(Encoding.UTF8.GetBytes(json));

    public static ByteArrayContent Content(byte[] body)
    {
        var content = new ByteArrayContent(body);
        content.Headers.ContentType = MediaTypeHeaderValue.Parse("application/fhir+json");
        return content;
    }
}
