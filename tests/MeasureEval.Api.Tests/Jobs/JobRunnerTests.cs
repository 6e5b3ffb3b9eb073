using System.Net;
using System.Text.Json.Nodes;
using MeasureEval.Api.Tests.Security;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Api.Tests.Jobs;

/// <summary>A job runs with the data scope of the caller who started it, rebuilt from the stored claims.</summary>
public sealed class JobRunnerTests(PayerScopeFixture fixture) : IClassFixture<PayerScopeFixture>
{
    private const string SubjectList =
        $"/Measure/{PayerScopeFixture.Measure}/$evaluate-measure?periodStart={PayerScopeFixture.PeriodStart}&periodEnd={PayerScopeFixture.PeriodEnd}&reportType=subject-list";

    [Fact]
    public async Task RunAsync_PayerJob_SeesOnlyThePayersMembersAsTheSynchronousRequest()
    {
        using var payer = fixture.CreateClient();
        payer.DefaultRequestHeaders.Authorization = TestTokens.Header("payer", PayerScopeFixture.PlanA);
        using var analyst = fixture.CreateClient();
        analyst.DefaultRequestHeaders.Authorization = TestTokens.Header("analyst");

        var synchronous = await payer.GetStringAsync(new Uri(SubjectList, UriKind.Relative));
        var everyone = await analyst.GetStringAsync(new Uri(SubjectList, UriKind.Relative));
        var (answer, _) = await AsyncPolling.KickOffAndWaitAsync(payer, SubjectList);
        using var final = answer;
        Assert.Equal(HttpStatusCode.OK, answer.StatusCode);
        var asynchronous = await answer.Content.ReadAsStringAsync();
        Assert.Equal(Normalized(synchronous), Normalized(asynchronous));
        // Not vacuous: plan A's members are fewer than everyone (PayerScopeFixture computes memberships from the bundle's Coverages).
        Assert.NotEqual(Normalized(everyone), Normalized(asynchronous));
        Assert.Contains(fixture.A.PatientId, asynchronous, StringComparison.Ordinal);
        Assert.DoesNotContain(fixture.B.PatientId, asynchronous, StringComparison.Ordinal);
    }

    private static string Normalized(string report)
    {
        var json = JsonNode.Parse(report)!.AsObject();
        json.Remove("id");
        json.Remove("date");
        return json.ToJsonString();
    }
}
