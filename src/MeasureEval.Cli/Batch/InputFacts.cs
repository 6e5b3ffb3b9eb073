using MeasureEval.Core.Index;

namespace MeasureEval.Cli.Batch;

/// <summary>Per-patient index entries built in memory from a directory of FHIR input, as the store builds them at write time.</summary>
internal static class InputFacts
{
    /// <summary>Only the extracted facts are kept; parsed resources are dropped batch by batch.</summary>
    public static IReadOnlyList<PatientFacts> Load(string directory, List<InputIssue> issues, IProgress<long>? recordsRead = null) =>
        PatientFactsAssembler.Assemble(FhirInputReader.Read(directory, issues, recordsRead).SelectMany(batch => batch).Select(p => p.Resource));
}
