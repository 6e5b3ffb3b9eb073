using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Api.Tests.Security;

/// <summary>What the probes need to know about one patient: its ids as stored, the MRN and its panel (first generalPractitioner).</summary>
public sealed record ProbeSubject(string PatientId, string ObservationId, string CoverageId, string GroupId, string MrnSystem, string Mrn, string Practitioner);

/// <summary>
/// The service loaded with the demo network (fhir-bundles/demo bundle-0000: organizations and practitioners) and its first
/// 50 patients (bundle-0001), two payer-managed Groups, and the patients the probes ask about. Memberships are computed
/// here from the bundle's Coverages (status active, payor the plan, period overlapping 2026) — the outside source the
/// service's answers are checked against.
/// </summary>
public sealed class PayerScopeFixture : ApiFactory, IAsyncLifetime
{
    // Organization ids of fhir-bundles/demo/bundle-0000.json.
    public const string PlanA = "1738e502-89ba-4fea-8280-82bf77eed540";
    public const string PlanAName = "Cedar Valley Health Plan";
    public const string PlanB = "cca7291d-76a7-4eb8-ba3d-8b38813f26f8";
    public const string PlanBName = "Lakeshore Medicaid Partners";
    public const string Measure = "influenza-vaccination";
    public const string PeriodStart = "2026-01-01";
    public const string PeriodEnd = "2026-12-31";

    /// <summary>An analyst-side Group (no managing payer) of plan A's members during 2026.</summary>
    public const string PlanAMembersGroup = "plan-a-members-2026";

    public ProbeSubject A { get; private set; } = null!;

    public ProbeSubject B { get; private set; } = null!;

    public ProbeSubject Unknown { get; } = new("no-such-patient", "no-such-observation", "no-such-coverage", "no-such-group", "http://riverbend-health.example.org/fhir/mrn", "NO-SUCH-MRN", "Practitioner/no-such-practitioner");

    public async Task InitializeAsync()
    {
        using var admin = CreateClient();
        var folder = DemoFolder();
        var patients = JsonDocument.Parse(await File.ReadAllTextAsync(Path.Combine(folder, "bundle-0001.json")));
        foreach (var file in new[] { "bundle-0000.json", "bundle-0001.json" })
        {
            using var content = new StringContent(await File.ReadAllTextAsync(Path.Combine(folder, file)), Encoding.UTF8, "application/fhir+json");
            using var response = await admin.PostAsync(new Uri("/", UriKind.Relative), content);
            Assert.True(response.IsSuccessStatusCode, $"{file}: {(int)response.StatusCode}");
        }

        var resources = patients.RootElement.GetProperty("entry").EnumerateArray().Select(e => e.GetProperty("resource")).ToList();
        var coverages = resources.Where(r => r.GetProperty("resourceType").GetString() == "Coverage").ToList();
        var aIn2026 = Members(coverages, PlanA, in2026: true);
        var aAny = Members(coverages, PlanA, in2026: false);
        var bAny = Members(coverages, PlanB, in2026: false);

        // Only patients that the measure counts, so that the analyst's listing shows them and a leak could show.
        using var analyst = CreateClient();
        analyst.DefaultRequestHeaders.Authorization = TestTokens.Header("analyst");
        var listing = await analyst.GetStringAsync(new Uri($"/Measure/{Measure}/$evaluate-measure?periodStart={PeriodStart}&periodEnd={PeriodEnd}&reportType=subject-list", UriKind.Relative));
        var aId = aIn2026.Except(bAny).Order(StringComparer.Ordinal).First(listing.Contains);
        var bId = bAny.Except(aAny).Order(StringComparer.Ordinal).First(listing.Contains);
        A = Subject(resources, aId, "plan-a-attributed");
        B = Subject(resources, bId, "plan-b-attributed");

        await PutAsync(admin, $"Group/{A.GroupId}", Group(A.GroupId, PlanA, [aId]));
        await PutAsync(admin, $"Group/{B.GroupId}", Group(B.GroupId, PlanB, [bId]));
        await PutAsync(admin, $"Group/{PlanAMembersGroup}", Group(PlanAMembersGroup, null, aIn2026));
    }

    Task IAsyncLifetime.DisposeAsync() => Task.CompletedTask;

    public HttpClient Client(AuthenticationHeaderValue token)
    {
        var client = CreateClient();
        client.DefaultRequestHeaders.Authorization = token;
        return client;
    }

    /// <summary>Patients with an active Coverage whose payor is the plan (during 2026, or in any period).</summary>
    private static HashSet<string> Members(List<JsonElement> coverages, string plan, bool in2026)
    {
        var members = new HashSet<string>(StringComparer.Ordinal);
        foreach (var coverage in coverages)
        {
            var payors = coverage.GetProperty("payor").EnumerateArray().Select(p => p.GetProperty("reference").GetString());
            if (coverage.GetProperty("status").GetString() != "active" || !payors.Contains($"Organization/{plan}"))
            {
                continue;
            }

            var period = coverage.TryGetProperty("period", out var p) ? p : default;
            var start = period.ValueKind == JsonValueKind.Object && period.TryGetProperty("start", out var s) ? s.GetString()! : "0001-01-01";
            var end = period.ValueKind == JsonValueKind.Object && period.TryGetProperty("end", out var e) ? e.GetString()! : "9999-12-31";

            // The bundle states full dates (yyyy-MM-dd), so string order is date order.
            if (!in2026 || (string.CompareOrdinal(start, PeriodEnd) <= 0 && string.CompareOrdinal(end, PeriodStart) >= 0))
            {
                members.Add(coverage.GetProperty("beneficiary").GetProperty("reference").GetString()!["Patient/".Length..]);
            }
        }

        return members;
    }

    private static ProbeSubject Subject(List<JsonElement> resources, string patientId, string groupId)
    {
        string? Of(string type, string element) => resources.FirstOrDefault(r => r.GetProperty("resourceType").GetString() == type
            && r.TryGetProperty(element, out var reference) && reference.GetProperty("reference").GetString() == $"Patient/{patientId}").GetProperty("id").GetString();
        var patient = resources.Single(r => r.GetProperty("resourceType").GetString() == "Patient" && r.GetProperty("id").GetString() == patientId);
        var mrn = patient.GetProperty("identifier")[0];
        return new ProbeSubject(patientId, Of("Observation", "subject")!, Of("Coverage", "beneficiary")!, groupId, mrn.GetProperty("system").GetString()!, mrn.GetProperty("value").GetString()!,
            patient.GetProperty("generalPractitioner")[0].GetProperty("reference").GetString()!);
    }

    private static string Group(string id, string? manager, IEnumerable<string> members)
    {
        var group = new Dictionary<string, object>
        {
            ["resourceType"] = "Group",
            ["id"] = id,
            ["type"] = "person",
            ["actual"] = true,
            ["member"] = members.Order(StringComparer.Ordinal).Select(m => new { entity = new { reference = $"Patient/{m}" } }).ToArray(),
        };
        if (manager is not null)
        {
            group["managingEntity"] = new { reference = $"Organization/{manager}" };
        }

        return JsonSerializer.Serialize(group);
    }

    private static async Task PutAsync(HttpClient client, string path, string json)
    {
        using var content = new StringContent(json, Encoding.UTF8, "application/fhir+json");
        using var response = await client.PutAsync(new Uri("/" + path, UriKind.Relative), content);
        Assert.True(response.IsSuccessStatusCode, $"PUT {path}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
    }

    private static string DemoFolder()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            var candidate = Path.Combine(dir.FullName, "fhir-bundles", "demo");
            if (Directory.Exists(candidate))
            {
                return candidate;
            }
        }

        throw new DirectoryNotFoundException("fhir-bundles/demo not found above the test output folder.");
    }
}
