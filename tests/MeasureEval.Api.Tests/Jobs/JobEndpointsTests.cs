using MeasureEval.Api.Jobs;
using MeasureEval.Core.Storage;

namespace MeasureEval.Api.Tests.Jobs;

public sealed class JobEndpointsTests
{
    private static readonly DateTimeOffset At = new(2026, 12, 1, 23, 0, 0, TimeSpan.Zero);

    [Theory]
    // X-Progress is free text (R4 async.html, in-progress status: an optional X-Progress header with a text
    // description; from memory: verify); ours is "done of total unit", thousands grouped (our rule).
    [InlineData(JobState.Queued, 0, 0, 0, null, "queued")]
    [InlineData(JobState.Running, 1, 0, 0, null, "started")]
    [InlineData(JobState.Running, 1, 41_200, 100_000, "patients", "41,200 of 100,000 patients")]
    [InlineData(JobState.Running, 1, 12, 0, "partitions", "12 partitions")]
    public void Progress_State_Text(JobState state, int attempts, long done, long total, string? unit, string expected)
    {
        var job = new JobRecord("j", JobKinds.EvaluateMeasure, "{}", "{}", state, attempts, done, total, unit, At, At, "w1", At.AddSeconds(30));

        Assert.Equal(expected, JobEndpoints.Progress(job, At));
    }

    [Fact]
    public void Progress_ExpiredLease_Interrupted()
    {
        var job = new JobRecord("j", JobKinds.EvaluateMeasure, "{}", "{}", JobState.Running, 1, 40, 100, "patients", At, At, "w1", At.AddSeconds(30));

        // Our rule: the progress of a run whose worker stopped is no longer reported; the next run starts from 0.
        Assert.Equal("interrupted; waiting to run again (attempt 2)", JobEndpoints.Progress(job, At.AddSeconds(30)));
        Assert.Equal("40 of 100 patients", JobEndpoints.Progress(job, At.AddSeconds(29)));
    }
}
