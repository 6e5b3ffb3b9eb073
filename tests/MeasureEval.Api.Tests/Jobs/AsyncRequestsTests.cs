using MeasureEval.Api.Jobs;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Tests.Jobs;

public sealed class AsyncRequestsTests
{
    [Theory]
    // RFC 7240 section 2: preferences are comma-separated tokens, names case-insensitive, parameters after ';'.
    // R4 async.html: the client asks with "Prefer: respond-async".
    [InlineData("respond-async", true)]
    [InlineData("RESPOND-ASYNC", true)]
    [InlineData("return=minimal, respond-async", true)]
    [InlineData("respond-async; wait=10", true)]
    [InlineData("return=representation", false)]
    [InlineData("respond-asynchronously", false)]
    [InlineData(null, false)]
    public void Wanted_PreferHeader(string? prefer, bool expected)
    {
        var context = new DefaultHttpContext();
        if (prefer is not null)
        {
            context.Request.Headers["Prefer"] = prefer;
        }

        Assert.Equal(expected, AsyncRequests.Wanted(context.Request));
    }
}
