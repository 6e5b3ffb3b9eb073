using Hl7.Fhir.Model;
using MeasureEval.Storage.Common;
using Microsoft.Extensions.Time.Testing;

namespace MeasureEval.Storage.Tests;

public sealed class ResourceKeysTests
{
    [Theory]
    // FHIR R4 datatypes, "id": [A-Za-z0-9\-\.]{1,64}.
    [InlineData("pat-ana", true)]
    [InlineData("a.B-9", true)]
    [InlineData("", false)]
    [InlineData("has space", false)]
    [InlineData("under_score", false)]
    [InlineData("Patient/1", false)]
    public void IsValidId_Candidate_FollowsFhirIdRule(string id, bool valid) => Assert.Equal(valid, ResourceKeys.IsValidId(id));

    [Fact]
    public void IsValidId_SixtyFiveCharacters_IsRejected()
    {
        Assert.True(ResourceKeys.IsValidId(new string('x', 64)));
        Assert.False(ResourceKeys.IsValidId(new string('x', 65)));
    }

    [Fact]
    public void NewId_SameInstant_GivesDistinctValidIds()
    {
        var time = new FakeTimeProvider();

        var ids = Enumerable.Range(0, 1000).Select(_ => ResourceKeys.NewId(time)).ToList();

        Assert.Equal(ids.Count, ids.Distinct(StringComparer.Ordinal).Count());
        Assert.All(ids, id => Assert.True(ResourceKeys.IsValidId(id), id));
    }

    [Fact]
    public void CompartmentPatientOf_ReferenceForms_ResolvesPatientOnly()
    {
        Assert.Equal("pat-ana", ResourceKeys.CompartmentPatientOf(TestResources.Ana()));
        Assert.Equal("pat-ana", ResourceKeys.CompartmentPatientOf(TestResources.HbA1c()));
        Assert.Equal("pat-ana", ResourceKeys.CompartmentPatientOf(TestResources.Flu()));
        Assert.Equal("pat-ana", ResourceKeys.CompartmentPatientOf(TestResources.AnaCoverage()));
        Assert.Null(ResourceKeys.CompartmentPatientOf(TestResources.CedarValley()));
        var allergy = new AllergyIntolerance { Patient = new ResourceReference("https://riverbend.example.org/fhir/Patient/pat-ana/_history/3") };
        Assert.Equal("pat-ana", ResourceKeys.CompartmentPatientOf(allergy));
        var groupSubject = new Observation { Subject = new ResourceReference("Group/riverbend-diabetes-panel") };
        Assert.Null(ResourceKeys.CompartmentPatientOf(groupSubject));
    }

    [Fact]
    public void IdentifiersOf_RepeatedAndSystemless_GivesDistinctTokens()
    {
        var patient = TestResources.Ana();
        patient.Identifier.Add(new Identifier("https://riverbend.example.org/mrn", "RB-1001"));
        patient.Identifier.Add(new Identifier { System = "https://riverbend.example.org/mrn" });

        var tokens = ResourceKeys.IdentifiersOf(patient);

        Assert.Equal([("https://riverbend.example.org/mrn", "RB-1001"), ("", "LOCAL-17")], tokens.OrderByDescending(t => t.System, StringComparer.Ordinal));
    }

    [Fact]
    public void IdentifiersOf_SingleIdentifierElement_IsRead()
    {
        // Bundle.identifier is 0..1 in R4, unlike the 0..* of most resources.
        var bundle = new Bundle { Identifier = new Identifier("urn:ietf:rfc:3986", "urn:uuid:0c3a7f5e-1f5b-4c55-9d59-3b1e0f7b2a11") };

        Assert.Equal([("urn:ietf:rfc:3986", "urn:uuid:0c3a7f5e-1f5b-4c55-9d59-3b1e0f7b2a11")], ResourceKeys.IdentifiersOf(bundle));
    }
}
