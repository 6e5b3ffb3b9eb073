using System.Net;
using System.Text;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Testing;

namespace MeasureEval.Api.Tests.Measures;

public sealed class MeasureEndpointsTests : IDisposable
{
    private const string FhirJsonType = "application/fhir+json";
    private readonly MeasureApiFactory _factory = new(MeasureApiFactory.NewDatabaseFile());

    public void Dispose() => _factory.Dispose();

    [Fact]
    public async System.Threading.Tasks.Task ReadMeasureAsync_Known_ReturnsValidMeasure()
    {
        using var client = _factory.CreateClient();
        var response = await client.GetAsync(new Uri("/Measure/diabetes-a1c-above-9", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var measure = FhirJson.Parse<Measure>(await response.Content.ReadAsStringAsync());
        Assert.Equal("decrease", measure.ImprovementNotation!.Coding[0].Code);
        Assert.Empty(BaseR4Validator.Shared.Errors(measure));
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadMeasureAsync_Unknown_Returns404Outcome()
    {
        using var client = _factory.CreateClient();
        var response = await client.GetAsync(new Uri("/Measure/no-such-measure", UriKind.Relative));

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
        Assert.Equal("MEV-MEASURE-002", FhirJson.Parse<OperationOutcome>(await response.Content.ReadAsStringAsync()).Issue[0].Details!.Coding[0].Code);
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadLibraryAsync_Measure_CarriesTheDefinitionFile()
    {
        using var client = _factory.CreateClient();
        var library = FhirJson.Parse<Library>(await client.GetStringAsync(new Uri("/Library/colorectal-cancer-screening", UriKind.Relative)));

        Assert.Equal("application/vnd.measureeval+json", library.Content[0].ContentType);
        Assert.Contains("\"id\": \"colorectal-cancer-screening\"", Encoding.UTF8.GetString(library.Content[0].Data!), StringComparison.Ordinal);
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadLibraryAsync_NeitherMeasureNorLibrary_Returns404()
    {
        using var client = _factory.CreateClient();
        var response = await client.GetAsync(new Uri("/Library/no-such-library", UriKind.Relative));

        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task EvaluateGetAsync_StoredPanel_CountsPopulationsAndValidates()
    {
        using var client = _factory.CreateClient();
        await StorePanelAsync(client);

        var response = await client.GetAsync(new Uri("/Measure/diabetes-a1c-below-8/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31", UriKind.Relative));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var report = FhirJson.Parse<MeasureReport>(await response.Content.ReadAsStringAsync());
        Assert.Equal(MeasureReport.MeasureReportType.Summary, report.Type);
        // rb-001 64 mmol/mol = 8.007 % (not < 8), rb-002 7.2 %, rb-004 75 mmol/mol = 9.013 % (NGSP master equation).
        Assert.Equal([3, 3, 0, 1], report.Group[0].Population.Select(p => p.Count ?? -1));
        Assert.Empty(BaseR4Validator.Shared.Errors(report));
    }

    [Fact]
    public async System.Threading.Tasks.Task EvaluateGetAsync_PatientSubject_DefaultsToIndividualReport()
    {
        using var client = _factory.CreateClient();
        await StorePanelAsync(client);

        var report = FhirJson.Parse<MeasureReport>(await client.GetStringAsync(new Uri("/Measure/diabetes-a1c-below-8/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31&subject=Patient/rb-002", UriKind.Relative)));

        Assert.Equal(MeasureReport.MeasureReportType.Individual, report.Type);
        Assert.Equal("Patient/rb-002", report.Subject!.Reference);
        Assert.Contains(report.EvaluatedResource, r => r.Reference == "Observation/rb-002-o1");
    }

    [Fact]
    public async System.Threading.Tasks.Task EvaluateGetAsync_GroupSubjectList_ListsOnlyMembers()
    {
        using var client = _factory.CreateClient();
        await StorePanelAsync(client);

        var report = FhirJson.Parse<MeasureReport>(await client.GetStringAsync(new Uri("/Measure/diabetes-a1c-below-8/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31&subject=Group/cedar-diabetes&reportType=subject-list", UriKind.Relative)));

        var list = report.Contained.OfType<List>().Single(l => l.Id == "subjects-initial-population");
        Assert.Equal(["Patient/rb-001", "Patient/rb-002"], list.Entry.Select(e => e.Item.Reference));
        Assert.Empty(BaseR4Validator.Shared.Errors(report));
    }

    [Fact]
    public async System.Threading.Tasks.Task EvaluateGetAsync_PractitionerFilter_KeepsThatPanel()
    {
        using var client = _factory.CreateClient();
        await StorePanelAsync(client);

        var report = FhirJson.Parse<MeasureReport>(await client.GetStringAsync(new Uri("/Measure/diabetes-a1c-below-8/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31&practitioner=Practitioner/dr-okafor", UriKind.Relative)));

        Assert.Equal(1, report.Group[0].Population.Single(p => p.Code!.Coding[0].Code == "initial-population").Count);
    }

    [Fact]
    public async System.Threading.Tasks.Task EvaluateGetAsync_BadParameters_Returns400WithExpressions()
    {
        using var client = _factory.CreateClient();
        var response = await client.GetAsync(new Uri("/Measure/diabetes-a1c-below-8/$evaluate-measure?periodStart=2026-13-01&reportType=everything&subject=Device/x", UriKind.Relative));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = FhirJson.Parse<OperationOutcome>(await response.Content.ReadAsStringAsync());
        Assert.Equal(["periodStart", "reportType", "subject"], outcome.Issue.Select(i => i.Expression.Single()).Order(StringComparer.Ordinal));
    }

    [Fact]
    public async System.Threading.Tasks.Task EvaluateManyAsync_TwoMeasures_ReturnsOneReportEach()
    {
        using var client = _factory.CreateClient();
        await StorePanelAsync(client);
        var parameters = new Parameters();
        parameters.Add("measureId", new FhirString("diabetes-a1c-below-8"));
        parameters.Add("measureId", new FhirString("hypertension-bp-below-140-90"));
        parameters.Add("periodStart", new Date("2026-01-01"));
        parameters.Add("periodEnd", new Date("2026-12-31"));

        var response = await client.PostAsync(new Uri("/Measure/$evaluate-measure", UriKind.Relative), Body(parameters));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var bundle = FhirJson.Parse<Bundle>(await response.Content.ReadAsStringAsync());
        var reports = bundle.Entry.Select(e => (MeasureReport)e.Resource!).ToList();
        Assert.Equal(["https://measureeval.example.org/fhir/Measure/diabetes-a1c-below-8|1.0.0", "https://measureeval.example.org/fhir/Measure/hypertension-bp-below-140-90|1.0.0"], reports.Select(r => r.Measure));
        // Hypertension: rb-002 (150/85 and 135/95 → 135/85, controlled) and rb-003 (148/92).
        Assert.Equal(1, reports[1].Group[0].Population.Single(p => p.Code!.Coding[0].Code == "numerator").Count);
    }

    [Fact]
    public async System.Threading.Tasks.Task PutValueSetAsync_UnknownCodeSystem_Returns400Located()
    {
        using var client = _factory.CreateClient();
        var valueSet = new ValueSet
        {
            Id = "cedar-statins",
            Url = "https://cedar.example.org/fhir/ValueSet/cedar-statins",
            Status = PublicationStatus.Active,
            Description = "invented for a test",
            Compose = new ValueSet.ComposeComponent { Include = [new ValueSet.ConceptSetComponent { System = "http://example.org/not-a-code-system", Concept = [new ValueSet.ConceptReferenceComponent { Code = "x" }] }] },
        };

        var response = await client.PutAsync(new Uri("/ValueSet/cedar-statins", UriKind.Relative), Body(valueSet));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal("ValueSet.compose.include[0].system", FhirJson.Parse<OperationOutcome>(await response.Content.ReadAsStringAsync()).Issue.Single().Expression.Single());
    }

    [Fact]
    public async System.Threading.Tasks.Task PutMeasureAsync_NewDefinition_IsKeptAcrossRestart()
    {
        var definition = File.ReadAllText(Path.Combine(MeasuresDirectory(), "diabetes-a1c-below-8.measure.json"))
            .Replace("\"id\": \"diabetes-a1c-below-8\"", "\"id\": \"cedar-a1c-below-8\"", StringComparison.Ordinal)
            .Replace("/Measure/diabetes-a1c-below-8", "/Measure/cedar-a1c-below-8", StringComparison.Ordinal);
        using (var client = _factory.CreateClient())
        {
            var response = await client.PutAsync(new Uri("/Measure/cedar-a1c-below-8", UriKind.Relative), new StringContent(definition, Encoding.UTF8, "application/vnd.measureeval+json"));
            Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        }

        using var restarted = new MeasureApiFactory(_factory.DatabaseFile);
        using var again = restarted.CreateClient();
        var measure = FhirJson.Parse<Measure>(await again.GetStringAsync(new Uri("/Measure/cedar-a1c-below-8", UriKind.Relative)));
        Assert.Equal("https://measureeval.example.org/fhir/Measure/cedar-a1c-below-8", measure.Url);
    }

    [Fact]
    public async System.Threading.Tasks.Task PutMeasureAsync_UnknownValueSet_Returns400AtThePath()
    {
        var definition = File.ReadAllText(Path.Combine(MeasuresDirectory(), "diabetes-a1c-below-8.measure.json"))
            .Replace("\"valueSet\": \"hba1c\"", "\"valueSet\": \"hba1c-missing\"", StringComparison.Ordinal);
        using var client = _factory.CreateClient();

        var response = await client.PutAsync(new Uri("/Measure/diabetes-a1c-below-8", UriKind.Relative), new StringContent(definition, Encoding.UTF8, "application/vnd.measureeval+json"));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal("definitions.most-recent-a1c-below-8.mostRecent.of.valueSet", FhirJson.Parse<OperationOutcome>(await response.Content.ReadAsStringAsync()).Issue.Single().Expression.Single());
    }

    private static StringContent Body(Resource resource) => new(FhirJson.Serialize(resource), Encoding.UTF8, FhirJsonType);

    private static string MeasuresDirectory()
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (directory is not null && !File.Exists(Path.Combine(directory.FullName, "MeasureEval.sln")))
        {
            directory = directory.Parent;
        }

        return Path.Combine(directory!.FullName, "measures");
    }

    /// <summary>Stores the invented Riverbend panel of the engine tests plus a Group of two of its patients, in one transaction.</summary>
    private static async System.Threading.Tasks.Task StorePanelAsync(HttpClient client)
    {
        var path = Path.Combine(MeasuresDirectory(), "..", "tests", "MeasureEval.Engine.Tests", "TestData", "riverbend-panel.json");
        var panel = FhirJson.Parse<Bundle>(File.ReadAllText(path));
        var transaction = new Bundle { Type = Bundle.BundleType.Transaction };
        var group = new Group
        {
            Id = "cedar-diabetes",
            Type = Group.GroupType.Person,
            Actual = true,
            Member = [new Group.MemberComponent { Entity = new ResourceReference("Patient/rb-001") }, new Group.MemberComponent { Entity = new ResourceReference("Patient/rb-002") }],
        };
        foreach (var resource in panel.Entry.Select(e => e.Resource!).Append(group))
        {
            transaction.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = $"urn:uuid:{Guid.NewGuid()}",
                Resource = resource,
                Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.PUT, Url = $"{resource.TypeName}/{resource.Id}" },
            });
        }

        var response = await client.PostAsync(new Uri("/", UriKind.Relative), Body(transaction));
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
    }
}
