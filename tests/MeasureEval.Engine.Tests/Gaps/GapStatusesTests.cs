using MeasureEval.Engine.Gaps;

namespace MeasureEval.Engine.Tests.Gaps;

public sealed class GapStatusesTests
{
    [Theory]
    // Codes of http://hl7.org/fhir/us/davinci-deqm/CodeSystem/gaps-status (Da Vinci DEQM IG).
    [InlineData("open-gap", GapStatus.Open)]
    [InlineData("closed-gap", GapStatus.Closed)]
    [InlineData("prospective-gap", GapStatus.Prospective)]
    [InlineData("not-applicable", GapStatus.NotApplicable)]
    public void TryParse_RoundTripsDeqmCodes(string code, GapStatus status)
    {
        Assert.True(GapStatuses.TryParse(code, out var parsed));
        Assert.Equal(status, parsed);
        Assert.Equal(code, status.Code());
    }

    [Fact]
    public void TryParse_UnknownCode() => Assert.False(GapStatuses.TryParse("open", out _));
}
