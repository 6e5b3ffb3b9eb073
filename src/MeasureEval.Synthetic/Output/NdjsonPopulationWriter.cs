using System.Text;
using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Output;

/// <summary>
/// Writes a population as FHIR Bulk Data NDJSON: one file per resource type (<c>Patient.ndjson</c>, …), one compact
/// resource per line, ids assigned, references relative (<c>Patient/{id}</c>). UTF-8 without BOM, <c>\n</c> line ends.
/// </summary>
public static class NdjsonPopulationWriter
{
    public static PopulationWriteSummary Write(PopulationGenerator generator, string directory, IProgress<int>? patientsDone = null)
    {
        ArgumentNullException.ThrowIfNull(generator);
        Directory.CreateDirectory(directory);
        var writers = new SortedDictionary<string, StreamWriter>(StringComparer.Ordinal);
        var counts = new SortedDictionary<string, long>(StringComparer.Ordinal);
        var order = new List<string>();
        try
        {
            void WriteLine(string type, string json)
            {
                if (!writers.TryGetValue(type, out var writer))
                {
                    var name = $"{type}.ndjson";
                    order.Add(name);
                    writer = new StreamWriter(Path.Combine(directory, name), append: false, new UTF8Encoding(false), 1 << 16) { NewLine = "\n" };
                    writers[type] = writer;
                    counts[type] = 0;
                }

                writer.Write(json);
                writer.Write('\n');
                counts[type]++;
            }

            foreach (var shared in generator.SharedResources())
            {
                WriteLine(shared.TypeName, FhirJson.Serialize(shared));
            }

            var done = 0;
            foreach (var chunk in ChunkedSerializer.Chunks(generator))
            {
                foreach (var patient in chunk)
                {
                    foreach (var resource in patient)
                    {
                        WriteLine(resource.ResourceType, resource.Json);
                    }
                }

                done += chunk.Length;
                patientsDone?.Report(done);
            }
        }
        finally
        {
            foreach (var writer in writers.Values)
            {
                writer.Dispose();
            }
        }

        return new PopulationWriteSummary(order, counts);
    }
}
