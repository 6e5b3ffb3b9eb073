using System.Text;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Output;

/// <summary>
/// Writes a population as FHIR transaction bundles: <c>bundle-0000.json</c> holds the shared Organizations and
/// Practitioners, then one bundle per <see cref="PopulationOptions.PatientsPerBundle"/> patients. Each entry has a
/// <c>urn:uuid:</c> fullUrl equal to its generated id and a PUT to <c>Type/id</c>, so loading a bundle twice
/// changes nothing; references are relative (<c>Patient/{id}</c>), so they resolve across bundles. Load
/// <c>bundle-0000.json</c> first.
/// </summary>
public static class BundlePopulationWriter
{
    public static PopulationWriteSummary Write(PopulationGenerator generator, string directory, IProgress<int>? patientsDone = null)
    {
        ArgumentNullException.ThrowIfNull(generator);
        Directory.CreateDirectory(directory);
        var options = generator.Options;
        var bundleCount = ((options.Patients + options.PatientsPerBundle - 1) / options.PatientsPerBundle) + 1;
        var width = Math.Max(4, (bundleCount - 1).ToString(System.Globalization.CultureInfo.InvariantCulture).Length);
        var files = new List<string>();
        var counts = new SortedDictionary<string, long>(StringComparer.Ordinal);

        void WriteBundle(IEnumerable<Resource> resources)
        {
            var bundle = new Bundle { Type = Bundle.BundleType.Transaction };
            foreach (var resource in resources)
            {
                bundle.Entry.Add(new Bundle.EntryComponent
                {
                    FullUrl = $"urn:uuid:{resource.Id}",
                    Resource = resource,
                    Request = new Bundle.RequestComponent { Method = Bundle.HTTPVerb.PUT, Url = $"{resource.TypeName}/{resource.Id}" },
                });
                counts[resource.TypeName] = counts.GetValueOrDefault(resource.TypeName) + 1;
            }

            var name = $"bundle-{files.Count.ToString(System.Globalization.CultureInfo.InvariantCulture).PadLeft(width, '0')}.json";
            File.WriteAllText(Path.Combine(directory, name), FhirJson.Serialize(bundle) + "\n", new UTF8Encoding(false));
            files.Add(name);
        }

        WriteBundle(generator.SharedResources());
        var pending = new List<Resource>();
        var inBundle = 0;
        var done = 0;
        foreach (var patient in generator.Patients())
        {
            pending.AddRange(patient.Resources);
            inBundle++;
            done++;
            if (inBundle == options.PatientsPerBundle)
            {
                WriteBundle(pending);
                pending.Clear();
                inBundle = 0;
                patientsDone?.Report(done);
            }
        }

        if (inBundle > 0)
        {
            WriteBundle(pending);
            patientsDone?.Report(done);
        }

        return new PopulationWriteSummary(files, counts);
    }
}
