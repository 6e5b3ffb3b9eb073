using Hl7.Fhir.Model;
using MeasureEval.Api.Audit;
using MeasureEval.Core.Audit;
using MeasureEval.Testing;

namespace MeasureEval.Api.Tests.Audit;

public sealed class AuditEventMapperTests
{
    // http://hl7.org/fhir/R4/valueset-audit-event-outcome.html: 0 success, 4 minor failure, 8 serious failure,
    // 12 major failure. Which HTTP status falls in which class is our rule (documented in DEVELOPERS.md).
    [Theory]
    [InlineData(200, AuditEvent.AuditEventOutcome.N0)]
    [InlineData(201, AuditEvent.AuditEventOutcome.N0)]
    [InlineData(204, AuditEvent.AuditEventOutcome.N0)]
    [InlineData(403, AuditEvent.AuditEventOutcome.N4)]
    [InlineData(429, AuditEvent.AuditEventOutcome.N4)]
    [InlineData(503, AuditEvent.AuditEventOutcome.N8)]
    [InlineData(500, AuditEvent.AuditEventOutcome.N12)]
    public void OutcomeOf_Status_MapsToOutcomeClass(int status, AuditEvent.AuditEventOutcome expected) =>
        Assert.Equal(expected, AuditEventMapper.OutcomeOf(status));

    [Theory]
    [InlineData("read", "R", null)]
    [InlineData("evaluate-measure", "E", "cedar-valley")]
    [InlineData("transaction", "E", null)]
    public void ToAuditEvent_Record_ValidAgainstBaseR4(string interaction, string action, string? payer)
    {
        var record = new AuditRecord
        {
            Id = "0193a4b2c3d47e8f9a0b1c2d3e4f5a6b",
            Recorded = new DateTimeOffset(2026, 12, 1, 10, 0, 0, TimeSpan.Zero),
            Agent = "analyst-7",
            Role = "analyst",
            Payer = payer,
            Operation = "route-name",
            Interaction = interaction,
            Action = action,
            Method = "GET",
            Route = "/{type}/{id}",
            Status = 200,
            Address = "10.1.2.3",
            RequestId = "req-1",
            Patients = ["p-1", "p-2"],
            PatientCount = 2,
        };

        var auditEvent = AuditEventMapper.ToAuditEvent(record);

        Assert.Empty(BaseR4Validator.Shared.Errors(auditEvent));
        Assert.Equal(["Patient/p-1", "Patient/p-2"], auditEvent.Entity.Where(e => e.What is not null).Select(e => e.What.Reference));
        Assert.Equal("10.1.2.3", auditEvent.Agent[0].Network.Address);
        Assert.Equal(Enum.Parse<AuditEvent.AuditEventAction>(action), auditEvent.Action);
    }
}
