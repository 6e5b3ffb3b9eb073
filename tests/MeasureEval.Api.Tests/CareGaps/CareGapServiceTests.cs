using MeasureEval.Api.CareGaps;
using MeasureEval.Core.Index;
using MeasureEval.Engine;

namespace MeasureEval.Api.Tests.CareGaps;

public sealed class CareGapServiceTests
{
    private static readonly MeasurementPeriod Year = MeasurementPeriod.CalendarYear(2026);

    [Fact]
    public void OnPanel_FirstGeneralPractitionerRelativeOrAbsolute()
    {
        Assert.True(CareGapService.OnPanel(Patient("Practitioner/dr-okafor"), "Practitioner/dr-okafor"));
        Assert.True(CareGapService.OnPanel(Patient("https://riverbend.example.org/fhir/Practitioner/dr-okafor"), "Practitioner/dr-okafor"));
        Assert.False(CareGapService.OnPanel(Patient("Practitioner/dr-okafor-2"), "Practitioner/dr-okafor"));
        Assert.False(CareGapService.OnPanel(Patient(null), "Practitioner/dr-okafor"));
        Assert.True(CareGapService.OnPanel(Patient(null), null));
    }

    [Theory]
    // Coverage counts when active and its period overlaps the MP; no period: all of it (measure-specs.md, Payer).
    [InlineData("active", "2026-06-01", null, true)]
    [InlineData("active", null, null, true)]
    [InlineData("active", "2024-01-01", "2025-12-31", false)]
    [InlineData("cancelled", "2026-01-01", "2026-12-31", false)]
    [InlineData("active", "2026-12-31", "2027-12-31", true)]
    public void CoveredBy_ActiveCoverageOverlappingThePeriod(string status, string? start, string? end, bool expected)
    {
        var facts = new PatientFacts
        {
            PatientId = "p",
            Coverages = [new CoverageFact { Id = "c", Status = status, Payors = ["Organization/cedar-valley"], PeriodStart = start, PeriodEnd = end }],
        };

        Assert.Equal(expected, CareGapService.CoveredBy(facts, "Organization/cedar-valley", Year));
        Assert.False(CareGapService.CoveredBy(facts, "Organization/blue-heron", Year));
    }

    private static PatientFacts Patient(string? practitioner) =>
        new() { PatientId = "p", Demographics = new Demographics { BirthDate = "1966-04-10", GeneralPractitioner = practitioner } };
}
