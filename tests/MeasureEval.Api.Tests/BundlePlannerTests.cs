using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

/// <summary>Bundle-level checks made before anything is written.</summary>
public sealed class BundlePlannerTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Plan_ReferenceToMissingUrnUuid_Returns422AtReference()
    {
        var response = await _client.PostAsync("/", Json(Input("BadInput/unresolved-reference.json")));

        Assert.Equal(HttpStatusCode.UnprocessableEntity, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        var issue = Issue(outcome, "MEV-BUNDLE-004");
        Assert.Equal(OperationOutcome.IssueType.NotFound, issue.Code);
        Assert.Equal(["Bundle.entry[0].resource.subject.reference"], issue.Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task Plan_DuplicateFullUrl_Returns400AtSecondEntry()
    {
        var response = await _client.PostAsync("/", Json(Input("BadInput/duplicate-fullurl.json")));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        var issue = Issue(outcome, "MEV-BUNDLE-003");
        Assert.Equal(OperationOutcome.IssueType.Duplicate, issue.Code);
        Assert.Equal(["Bundle.entry[1].fullUrl"], issue.Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task Plan_SeveralProblems_AllReported()
    {
        var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
        bundle.Entry.Add(new Bundle.EntryComponent { Resource = Patient("p-no-request") });
        bundle.Entry.Add(new Bundle.EntryComponent
        {
            Resource = Patient("p-a"),
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.PUT, Url = "Patient/p-b" },
        });
        bundle.Entry.Add(new Bundle.EntryComponent
        {
            Resource = Patient(),
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.PATCH, Url = "Patient/p-c" },
        });
        bundle.Entry.Add(new Bundle.EntryComponent
        {
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.DELETE, Url = "Patient?identifier=x" },
        });

        var response = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        Assert.Equal(["MEV-BUNDLE-002", "MEV-REQ-002", "MEV-BUNDLE-006", "MEV-BUNDLE-006"], Codes(outcome));
        Assert.Equal(
            ["Bundle.entry[0].request", "Bundle.entry[1].resource.id", "Bundle.entry[2].request.method", "Bundle.entry[3].request.url"],
            outcome.Issue.Select(i => i.Expression.Single()));
    }

    [Fact]
    public async System.Threading.Tasks.Task Plan_BatchEntryReferencingAnother_RefusedPerEntry()
    {
        var bundle = new Bundle { Type = Bundle.BundleType.Batch };
        var patientUrl = "urn:uuid:7d3c0b8f-2e9a-4f5b-8c63-8192a3b4c5d6";
        bundle.Entry.Add(new Bundle.EntryComponent
        {
            FullUrl = patientUrl,
            Resource = Patient(),
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.POST, Url = "Patient" },
        });
        bundle.Entry.Add(new Bundle.EntryComponent
        {
            Resource = new Observation { Status = ObservationStatus.Final, Code = new CodeableConcept { Text = "Body weight" }, Subject = new ResourceReference(patientUrl) },
            Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.POST, Url = "Observation" },
        });

        var response = await _client.PostAsync("/", Json(bundle));

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var result = await ReadAsync<Bundle>(response);
        Assert.Equal("201 Created", result.Entry[0].Response.Status);
        Assert.Equal("422 Unprocessable Entity", result.Entry[1].Response.Status);
        var outcome = Assert.IsType<OperationOutcome>(result.Entry[1].Response.Outcome);
        Assert.Equal(["Bundle.entry[1].resource.subject.reference"], Issue(outcome, "MEV-BUNDLE-008").Expression);
    }
}
