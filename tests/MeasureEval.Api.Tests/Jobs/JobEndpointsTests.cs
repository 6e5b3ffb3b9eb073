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
    [InlineData(JobState.Queued, 1, 0, 0, null, "queued again after a restart (attempt 2)")]
    [InlineData(JobState.Running, 1, 0, 0, null, "started")]
    [InlineData(JobState.Running, 1, 41_200, 100_000, "patients", "41,200 of 100,000 patients")]
    [InlineData(JobState.Running, 1, 12, 0, "partitions", "12 partitions")]
    public void Progress_State_Text(JobState state, int attempts, long done, long total, string? unit, string expected)
    {
        var job = new JobRecord("j", JobKinds.EvaluateMeasure, "{}", "{}", state, attempts, done, total, unit, At, At);

        Assert.Equal(expected, JobEndpoints.Progress(job));
    }
}
