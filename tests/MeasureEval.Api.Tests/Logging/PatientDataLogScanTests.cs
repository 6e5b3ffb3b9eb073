using System.Collections.Concurrent;
using System.Globalization;
using System.Net;
using System.Text.Json;
using System.Text.RegularExpressions;
using Hl7.Fhir.Model;
using MeasureEval.Api.Demo;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using Serilog.Core;
using Serilog.Events;
using Serilog.Formatting.Compact;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests.Logging;

/// <summary>Keeps every log event as one line: the rendered message, then all properties and the exception as JSON.</summary>
public sealed class CapturingSink : ILogEventSink
{
    private readonly CompactJsonFormatter _formatter = new();

    public ConcurrentQueue<string> Lines { get; } = new();

    public void Emit(LogEvent logEvent)
    {
        ArgumentNullException.ThrowIfNull(logEvent);
        using var writer = new StringWriter(CultureInfo.InvariantCulture);
        _formatter.Format(logEvent, writer);
        Lines.Enqueue(logEvent.RenderMessage(CultureInfo.InvariantCulture) + " " + writer);
    }
}

/// <summary>The demo population loaded, the service's own events at Debug and ASP.NET Core's at Information, all captured.</summary>
public sealed class VerboseDemoApiFactory : ApiFactory
{
    public CapturingSink Sink { get; } = new();

    protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>
    {
        ["Demo:Load"] = "true",
        ["Logging:Level"] = "Debug",
        ["Logging:FrameworkLevel"] = "Information",
    };

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        base.ConfigureWebHost(builder);
        builder.ConfigureTestServices(services => services.AddSingleton<ILogEventSink>(Sink));
    }
}

/// <summary>
/// Acceptance test of the rule "logs carry no patient data": after loading the demo data and using every reading
/// interface over it, no captured log line holds a demo patient's name, birth date or identifier value.
/// </summary>
public sealed partial class PatientDataLogScanTests(VerboseDemoApiFactory factory) : IClassFixture<VerboseDemoApiFactory>
{
    private const string Period = "periodStart=2026-01-01&periodEnd=2026-12-31";

    [Fact]
    public async System.Threading.Tasks.Task Logs_DemoWorkload_CarryNoPatientNamesBirthDatesOrIdentifiers()
    {
        var client = factory.CreateClient();
        Assert.True(await factory.Services.GetRequiredService<DemoLoader>().Loaded.WaitAsync(TimeSpan.FromMinutes(3)));
        var patients = DemoPatients();
        var first = patients[0];
        var second = patients[1];
        var analyst = factory.CreateClient();
        analyst.DefaultRequestHeaders.Authorization = TestTokens.Header("analyst");

        var measures = (await ReadAsync<Bundle>(await client.GetAsync("/Measure"))).Entry.Select(e => e.Resource.Id).ToList();
        Assert.NotEmpty(measures);
        var statuses = new List<(string, HttpStatusCode)>();
        async System.Threading.Tasks.Task GetAsync(HttpClient c, string url)
        {
            using var response = await c.GetAsync(url);
            await response.Content.ReadAsStringAsync();
            statuses.Add((url, response.StatusCode));
        }

        foreach (var measure in measures)
        {
            await GetAsync(analyst, $"/Measure/{measure}/$evaluate-measure?{Period}");
            await GetAsync(analyst, $"/Measure/{measure}/$evaluate-measure?{Period}&reportType=subject-list");
            await GetAsync(analyst, $"/Measure/{measure}/$evaluate-measure?{Period}&subject=Patient/{first.Id}");
            await GetAsync(analyst, $"/Measure/{measure}/$evaluate-measure?{Period}&subject=Patient/{second.Id}");
            await GetAsync(analyst, $"/reports/measures/{measure}?{Period}&format=json");
        }

        var many = new Parameters();
        many.Add("periodStart", new Date("2026-01-01"));
        many.Add("periodEnd", new Date("2026-12-31"));
        foreach (var measure in measures)
        {
            many.Add("measureId", new FhirString(measure));
        }

        statuses.Add(("evaluate many", (await analyst.PostAsync("/Measure/$evaluate-measure", Json(many))).StatusCode));
        await GetAsync(analyst, $"/Measure/$care-gaps?{Period}&subject=Patient/{first.Id}&status=open-gap&status=closed-gap");
        await GetAsync(analyst, $"/Measure/$care-gaps?{Period}");
        await GetAsync(analyst, $"/Measure/$care-gaps-export?{Period}&_format=csv");
        await GetAsync(analyst, $"/Measure/$care-gaps-export?{Period}&_format=ndjson&status=closed-gap");
        await GetAsync(analyst, $"/reports?{Period}");
        await GetAsync(analyst, $"/Patient/{first.Id}");
        await GetAsync(analyst, $"/Patient/{first.Id}/_history");
        await GetAsync(analyst, $"/Patient/{first.Id}/_history/1");
        await GetAsync(analyst, $"/Patient?identifier={Uri.EscapeDataString(first.IdentifierSystem + "|" + first.Identifiers[0])}");
        await GetAsync(analyst, $"/Observation?patient=Patient/{first.Id}&_count=5");
        // Refused requests that quote patient data in the URL or the body.
        await GetAsync(analyst, $"/Patient?family={first.Families[0]}&birthdate={first.BirthDate}");
        var bad = $$"""{"resourceType":"Patient","id":"{{first.Id}}","name":[{"family":"{{first.Families[0]}}"}],"birthDate":"{{first.BirthDate}}x"}""";
        statuses.Add(("bad update", (await client.PutAsync($"/Patient/{first.Id}", Json(bad))).StatusCode));
        await GetAsync(client, $"/AuditEvent?patient=Patient/{first.Id}");

        Assert.DoesNotContain(statuses, s => (int)s.Item2 >= 500);
        var lines = factory.Sink.Lines.ToList();
        Assert.True(lines.Count > 50, $"only {lines.Count} log lines captured");
        var leaks = new List<string>();
        foreach (var patient in patients)
        {
            foreach (var (kind, pattern) in patient.Sensitive())
            {
                var line = lines.FirstOrDefault(pattern.IsMatch);
                if (line is not null)
                {
                    leaks.Add($"{kind} of Patient/{patient.Id} in: {line[..Math.Min(line.Length, 300)]}");
                }
            }
        }

        Assert.Empty(leaks);
        await AssertAuditedAsync(client, first);
    }

    /// <summary>The accesses made above are in the audit trail, under the analyst's subject.</summary>
    private static async System.Threading.Tasks.Task AssertAuditedAsync(HttpClient admin, DemoPatient first)
    {
        var bundle = await ReadAsync<Bundle>(await admin.GetAsync($"/AuditEvent?patient=Patient/{first.Id}&agent=test-analyst&_count=1000"));
        var events = bundle.Entry.Select(e => e.Resource).OfType<AuditEvent>().ToList();
        var routes = events.SelectMany(e => e.Subtype).Where(c => c.System == "https://measureeval.example.org/fhir/CodeSystem/route").Select(c => c.Code).ToHashSet();

        Assert.Subset(new HashSet<string> { "read", "vread", "history-instance", "search-type", "evaluate-measure-get", "care-gaps-get", "care-gaps-export" }, routes);
        var subjectList = events.First(e => e.Entity.Count(x => x.What is not null) > 2 && e.Subtype.Any(c => c.Code == "evaluate-measure-get"));
        Assert.Empty(BaseR4Validator.Shared.Errors(subjectList));
    }

    private static List<DemoPatient> DemoPatients()
    {
        var folder = Path.Combine(RepositoryRoot(), "fhir-bundles", "demo");
        var patients = new List<DemoPatient>();
        foreach (var file in Directory.GetFiles(folder, "*.json").Order(StringComparer.Ordinal))
        {
            using var bundle = JsonDocument.Parse(File.ReadAllBytes(file));
            foreach (var entry in bundle.RootElement.GetProperty("entry").EnumerateArray())
            {
                var resource = entry.GetProperty("resource");
                if (resource.GetProperty("resourceType").GetString() == "Patient")
                {
                    patients.Add(DemoPatient.From(resource));
                }
            }
        }

        Assert.True(patients.Count >= 100, $"only {patients.Count} demo patients");
        return patients;
    }

    private static string RepositoryRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(Path.Combine(dir.FullName, "MeasureEval.sln")))
            {
                return dir.FullName;
            }
        }

        throw new DirectoryNotFoundException("MeasureEval.sln not found above the test output folder.");
    }

    private sealed record DemoPatient(string Id, List<string> Givens, List<string> Families, string? BirthDate, string IdentifierSystem, List<string> Identifiers)
    {
        public static DemoPatient From(JsonElement patient)
        {
            var givens = new List<string>();
            var families = new List<string>();
            foreach (var name in patient.TryGetProperty("name", out var names) ? names.EnumerateArray() : default)
            {
                givens.AddRange(name.TryGetProperty("given", out var given) ? given.EnumerateArray().Select(g => g.GetString()!) : []);
                if (name.TryGetProperty("family", out var family))
                {
                    families.Add(family.GetString()!);
                }
            }

            var identifiers = patient.TryGetProperty("identifier", out var ids) ? ids.EnumerateArray().ToList() : [];
            return new DemoPatient(
                patient.GetProperty("id").GetString()!,
                givens,
                families,
                patient.TryGetProperty("birthDate", out var birth) ? birth.GetString() : null,
                identifiers.Count > 0 && identifiers[0].TryGetProperty("system", out var system) ? system.GetString()! : "",
                [.. identifiers.Select(i => i.GetProperty("value").GetString()!)]);
        }

        /// <summary>Names as whole words (case-sensitive, as written), the birth date as written (ISO) and as .NET's invariant culture prints a date, identifier values anywhere.</summary>
        public IEnumerable<(string Kind, Regex Pattern)> Sensitive()
        {
            foreach (var name in Givens.Concat(Families))
            {
                yield return ("name", new Regex($@"\b{Regex.Escape(name)}\b", RegexOptions.CultureInvariant));
            }

            if (BirthDate is { } birthDate)
            {
                yield return ("birth date", new Regex(Regex.Escape(birthDate), RegexOptions.CultureInvariant));
                if (DateOnly.TryParseExact(birthDate, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var date))
                {
                    yield return ("birth date", new Regex(Regex.Escape(date.ToString(CultureInfo.InvariantCulture)), RegexOptions.CultureInvariant));
                }
            }

            foreach (var identifier in Identifiers)
            {
                yield return ("identifier", new Regex(Regex.Escape(identifier), RegexOptions.CultureInvariant));
            }
        }
    }
}
