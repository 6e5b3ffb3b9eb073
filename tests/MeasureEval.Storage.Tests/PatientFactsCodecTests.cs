using MeasureEval.Core.Index;
using MeasureEval.Storage.Common;

namespace MeasureEval.Storage.Tests;

public sealed class PatientFactsCodecTests
{
    [Fact]
    public void Decode_EncodedEntry_GivesEqualContent()
    {
        var entry = PatientFactsAssembler.Assemble([TestResources.Ana(), TestResources.HbA1c(), TestResources.AnaCoverage(), TestResources.Flu()]).Single();

        var decoded = PatientFactsCodec.Decode(PatientFactsCodec.Encode(entry));

        Assert.Equal(entry.PatientId, decoded.PatientId);
        Assert.Equal(entry.Demographics, decoded.Demographics);
        Assert.Equal(entry.Facts.Count, decoded.Facts.Count);
        foreach (var (expected, actual) in entry.Facts.Zip(decoded.Facts))
        {
            Assert.Equal((expected.ResourceType, expected.Id, expected.Status, expected.Time, expected.Quantity), (actual.ResourceType, actual.Id, actual.Status, actual.Time, actual.Quantity));
            Assert.Equal(expected.Codes, actual.Codes);
        }

        var coverage = Assert.Single(decoded.Coverages);
        Assert.Equal(["Organization/cedar-valley"], coverage.Payors);
    }

    [Fact]
    public void Decode_JsonNull_Throws() => Assert.Throws<InvalidDataException>(() => PatientFactsCodec.Decode("null"u8));
}
