using MeasureEval.Cluster.Partitions;
using MeasureEval.Engine;

namespace MeasureEval.Cluster.Tests.Partitions;

public sealed class MeasurePartialTests
{
    [Fact]
    public void Merge_AddsCountsStrataFindingsAndSubjects()
    {
        var a = new MeasurePartial { MeasureId = "m", PatientsEvaluated = 3, Counts = [2, 2, 1, 0, 1], Subjects = new() { [PopulationKind.Numerator] = ["p1"] } };
        a.Strata["age"] = new(StringComparer.Ordinal) { ["18-44"] = [1, 1, 0, 0, 1] };
        a.Findings["missing-birth-date"] = 1;
        var b = new MeasurePartial { MeasureId = "m", PatientsEvaluated = 2, Counts = [1, 1, 0, 0, 0], Subjects = new() { [PopulationKind.Numerator] = ["p2"] } };
        b.Strata["age"] = new(StringComparer.Ordinal) { ["18-44"] = [1, 1, 0, 0, 0], ["45-64"] = [0, 0, 0, 0, 0] };
        b.Findings["missing-birth-date"] = 2;

        a.Merge(b);

        Assert.Equal(5, a.PatientsEvaluated);
        Assert.Equal([3, 3, 1, 0, 1], a.Counts);
        Assert.Equal([2, 2, 0, 0, 1], a.Strata["age"]["18-44"]);
        Assert.Equal([0, 0, 0, 0, 0], a.Strata["age"]["45-64"]);
        Assert.Equal(3, a.Findings["missing-birth-date"]);
        Assert.Equal(["p1", "p2"], a.Subjects![PopulationKind.Numerator]);
    }
}
