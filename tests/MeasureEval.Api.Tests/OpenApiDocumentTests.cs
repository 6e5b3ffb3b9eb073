using MeasureEval.Api.Tests.Support;

namespace MeasureEval.Api.Tests;

/// <summary>openapi.yaml at the repository root is the generated document, kept in the repository for readers and clients.</summary>
public sealed class OpenApiDocumentTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private const string UpdateVariable = "UPDATE_OPENAPI";

    [Fact]
    public async System.Threading.Tasks.Task Document_Generated_EqualsCommittedOpenApiYaml()
    {
        var generated = Normalize(await factory.CreateClient().GetStringAsync("/swagger/v1/swagger.yaml"));
        var path = Path.Combine(RepositoryRoot(), "openapi.yaml");

        if (Environment.GetEnvironmentVariable(UpdateVariable) == "1")
        {
            await File.WriteAllTextAsync(path, generated);
        }

        var committed = File.Exists(path) ? Normalize(await File.ReadAllTextAsync(path)) : "";
        Assert.True(
            committed == generated,
            $"openapi.yaml differs from the generated document. Regenerate it with: {UpdateVariable}=1 dotnet test tests/MeasureEval.Api.Tests --filter {nameof(OpenApiDocumentTests)} and commit the file.");
    }

    [Fact]
    public async System.Threading.Tasks.Task Document_ProtectedOperations_RequireBearerJwt()
    {
        using var document = System.Text.Json.JsonDocument.Parse(await factory.CreateClient().GetStringAsync("/swagger/v1/swagger.json"));
        var root = document.RootElement;

        // OpenAPI 3 "http" scheme with scheme "bearer" (RFC 6750) and bearerFormat JWT.
        var scheme = root.GetProperty("components").GetProperty("securitySchemes").GetProperty("bearer");
        Assert.Equal("http", scheme.GetProperty("type").GetString());
        Assert.Equal("bearer", scheme.GetProperty("scheme").GetString());
        Assert.Equal("JWT", scheme.GetProperty("bearerFormat").GetString());
        var publicPaths = new[] { "/metadata", "/health/live", "/health/ready" };
        var checkedOperations = 0;
        foreach (var path in root.GetProperty("paths").EnumerateObject())
        {
            foreach (var operation in path.Value.EnumerateObject())
            {
                var secured = operation.Value.TryGetProperty("security", out var security)
                    && security.EnumerateArray().Any(r => r.TryGetProperty("bearer", out _));
                Assert.True(secured != publicPaths.Contains(path.Name), $"{operation.Name} {path.Name}: security {secured}");
                checkedOperations++;
            }
        }

        Assert.True(checkedOperations >= 20, $"only {checkedOperations} operations");
    }

    private static string Normalize(string text) => text.ReplaceLineEndings("\n").TrimEnd() + "\n";

    private static string RepositoryRoot()
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (directory is not null && !File.Exists(Path.Combine(directory.FullName, "MeasureEval.sln")))
        {
            directory = directory.Parent;
        }

        return directory?.FullName ?? throw new InvalidOperationException("MeasureEval.sln not found above " + AppContext.BaseDirectory);
    }
}
