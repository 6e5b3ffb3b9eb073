using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Evaluation;

public sealed class FhirPathFilterTests
{
    private static MeasureRepository Load(out IReadOnlyList<DefinitionIssue> issues)
    {
        var directory = Path.Combine(AppContext.BaseDirectory, "TestData", "fhirpath");
        var extra = Directory.EnumerateFiles(directory, "*.json").Select(p => DefinitionFile.FromName(Path.GetFileName(p), File.ReadAllBytes(p))!);
        return MeasureRepository.Load(RepositoryPaths.Repository.Files.Concat(extra), out issues);
    }

    [Fact]
    public void Load_ExpressionThatDoesNotCompile_IsLocated()
    {
        Load(out var issues);
        var issue = Assert.Single(issues);
        Assert.Equal(("bad-fhirpath.measure.json", "$.populations.numerator.exists.where[0].fhirpath"), (issue.File, issue.Path));
    }

    [Theory]
    [InlineData("Organization/riverbend-lab", true)]
    [InlineData("Organization/other-lab", false)]
    public void Evaluate_Filter_ReadsTheRecordsOwnResource(string performer, bool numerator)
    {
        var repository = Load(out _);
        repository.TryGetMeasure("a1c-by-performer", out var measure);
        Resource[] resources =
        [
            new Patient { Id = "p1", BirthDate = "1970-01-01" },
            new Encounter
            {
                Id = "e1", Status = Encounter.EncounterStatus.Finished, Class = new Coding("http://terminology.hl7.org/CodeSystem/v3-ActCode", "AMB"),
                Subject = new ResourceReference("Patient/p1"), Period = new Period(new FhirDateTime("2026-02-01"), new FhirDateTime("2026-02-01")),
            },
            new Observation
            {
                Id = "o1", Status = ObservationStatus.Final, Code = new CodeableConcept("http://loinc.org", "4548-4"), Subject = new ResourceReference("Patient/p1"),
                Effective = new FhirDateTime("2026-02-01"), Value = new Quantity(7.1m, "%", "http://unitsofmeasure.org"), Performer = [new ResourceReference(performer)],
            },
        ];
        var patient = Assert.Single(PatientFactsAssembler.Assemble(resources));

        var result = new MeasureEvaluator(repository, new InMemoryRecords(resources)).Evaluate(measure!, patient, TestPanel.Year2026);

        Assert.Equal(numerator, result.Numerator);
    }

    [Fact]
    public void Evaluate_FilterWithoutRecordSource_NeverPassesAndIsReported()
    {
        var repository = Load(out _);
        repository.TryGetMeasure("a1c-by-performer", out var measure);
        var patient = TestPanel.Patients.Single(p => p.PatientId == "rb-002");

        var result = new MeasureEvaluator(repository).Evaluate(measure!, patient, TestPanel.Year2026);

        Assert.False(result.Numerator);
        Assert.Contains(result.Findings, f => f.Code == FindingCodes.ResourceUnavailable && f.Resource == "Observation/rb-002-o1");
    }

    private sealed class InMemoryRecords(IReadOnlyList<Resource> resources) : IRecordSource
    {
        public Resource? Load(string resourceType, string id) => resources.FirstOrDefault(r => r.TypeName == resourceType && r.Id == id);
    }
}
