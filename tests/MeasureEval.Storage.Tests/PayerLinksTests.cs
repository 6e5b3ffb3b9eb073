using Hl7.Fhir.Model;
using MeasureEval.Storage.Common;

namespace MeasureEval.Storage.Tests;

public sealed class PayerLinksTests
{
    // FHIR R4 datatypes: date/dateTime may be given to year or month precision; the value means the whole of that span.
    [Theory]
    [InlineData("2026", "2026-01-01", "2026-12-31")]
    [InlineData("2024-02", "2024-02-01", "2024-02-29")] // 2024 is a leap year (Gregorian rule)
    [InlineData("2025-02", "2025-02-01", "2025-02-28")]
    [InlineData("2026-07-14", "2026-07-14", "2026-07-14")]
    [InlineData("2026-07-14T23:30:00+10:00", "2026-07-14", "2026-07-14")] // the stated day, as the engine's stated dates read it
    public void FirstDayLastDay_StatedDates_CoverTheirWholeSpan(string stated, string first, string last)
    {
        Assert.Equal(first, PayerLinks.FirstDay(stated));
        Assert.Equal(last, PayerLinks.LastDay(stated));
    }

    [Fact]
    public void FirstDayLastDay_Missing_IsOpen()
    {
        Assert.Null(PayerLinks.FirstDay(null));
        Assert.Null(PayerLinks.LastDay(null));
    }

    [Theory]
    [InlineData("Organization/cedar-valley", "cedar-valley")]
    [InlineData("https://plans.example.org/fhir/Organization/cedar-valley", "cedar-valley")]
    [InlineData("Organization/cedar-valley/_history/3", "cedar-valley")]
    [InlineData("Patient/p-1", null)] // self-pay: the payor is the patient (FHIR R4 Coverage.payor)
    [InlineData("MyOrganization/x", null)]
    [InlineData("Organization/", null)]
    public void OrganizationIdOf_References_GiveTheOrganizationId(string reference, string? expected)
    {
        Assert.Equal(expected, PayerLinks.OrganizationIdOf(new ResourceReference(reference)));
    }

    [Fact]
    public void MembershipsOf_InactiveGroup_AttributesNobody()
    {
        var group = new Group
        {
            Id = "g",
            Active = false,
            ManagingEntity = new ResourceReference("Organization/plan-a"),
            Member = [new Group.MemberComponent { Entity = new ResourceReference("Patient/p") }],
        };

        Assert.Empty(PayerLinks.MembershipsOf(group));
        Assert.Equal(["plan-a"], PayerLinks.OwnersOf(group));
    }

    [Fact]
    public void MembershipsOf_ActiveCoverage_OneRowPerOrganizationPayor()
    {
        var coverage = new Coverage
        {
            Id = "c",
            Status = FinancialResourceStatusCodes.Active,
            Beneficiary = new ResourceReference("Patient/p"),
            Period = new Period { Start = "2026-03", End = "2026-09-15" },
            Payor = [new ResourceReference("Organization/plan-a"), new ResourceReference("Patient/p"), new ResourceReference("Organization/plan-b")],
        };

        Assert.Equal(
            [new PayerMembership("plan-a", "p", "2026-03-01", "2026-09-15"), new PayerMembership("plan-b", "p", "2026-03-01", "2026-09-15")],
            PayerLinks.MembershipsOf(coverage));
    }
}
