using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Tests.Population;

public class PopulationOptionsTests
{
    [Fact]
    public void Validate_SeveralBadValues_ReportsEachOne()
    {
        var options = new PopulationOptions { Patients = 0, Seed = 1, AsOf = new DateOnly(1900, 1, 1), PatientsPerBundle = 0 };
        Assert.Equal(3, options.Validate().Count);
    }

    [Fact]
    public void Validate_UsableValues_ReportsNothing()
    {
        Assert.Empty(DemoPopulation.Options.Validate());
    }
}
