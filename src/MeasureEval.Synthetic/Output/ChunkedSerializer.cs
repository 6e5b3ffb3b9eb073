using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Output;

/// <summary>
/// Generates and serializes patients a chunk at a time on all cores, handing each chunk on in patient order,
/// so output is identical to a sequential run and memory stays bounded by the chunk.
/// </summary>
internal static class ChunkedSerializer
{
    private const int ChunkSize = 256;

    /// <summary>One serialized resource: its type and compact JSON.</summary>
    public readonly record struct SerializedResource(string ResourceType, string Json);

    public static IEnumerable<IReadOnlyList<SerializedResource>[]> Chunks(PopulationGenerator generator)
    {
        var options = generator.Options;
        var network = generator.Network;
        for (var start = 0; start < options.Patients; start += ChunkSize)
        {
            var count = Math.Min(ChunkSize, options.Patients - start);
            var chunk = new IReadOnlyList<SerializedResource>[count];
            Parallel.For(0, count, i =>
            {
                var record = PatientSimulator.Simulate(options.Seed, start + i, network, options.AsOf);
                chunk[i] = [.. record.Resources.Select(r => new SerializedResource(r.TypeName, FhirJson.Serialize(r)))];
            });
            yield return chunk;
        }
    }
}
