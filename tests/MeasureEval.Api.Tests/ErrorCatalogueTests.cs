using System.Reflection;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.Tests;

public sealed class ErrorCatalogueTests
{
    [Fact]
    public void All_EveryDeclaredCode_ListedOnceWithStableFormat()
    {
        var declared = typeof(ErrorCatalogue).GetFields(BindingFlags.Public | BindingFlags.Static)
            .Where(f => f.FieldType == typeof(ErrorCode))
            .Select(f => (ErrorCode)f.GetValue(null)!)
            .ToList();

        Assert.Equal(declared.Select(c => c.Code).Order(StringComparer.Ordinal), ErrorCatalogue.All.Select(c => c.Code).Order(StringComparer.Ordinal));
        Assert.Equal(ErrorCatalogue.Published.Count, ErrorCatalogue.Published.Select(c => c.Code).Distinct(StringComparer.Ordinal).Count());
        Assert.All(ErrorCatalogue.Published, c => Assert.Matches("^MEV-[A-Z]+-[0-9]{3}$", c.Code));
    }

    [Fact]
    public void All_EveryCode_DocumentedInDevelopersGuide()
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (directory is not null && !File.Exists(Path.Combine(directory.FullName, "DEVELOPERS.md")))
        {
            directory = directory.Parent;
        }

        var guide = File.ReadAllText(Path.Combine(directory!.FullName, "DEVELOPERS.md"));

        Assert.All(ErrorCatalogue.Published, c => Assert.Contains($"| `{c.Code}` |", guide, StringComparison.Ordinal));
    }

    [Fact]
    public void All_ErrorStatuses_AreClientOrServerErrors()
    {
        Assert.All(
            ErrorCatalogue.Published.Where(c => c.Severity is Hl7.Fhir.Model.OperationOutcome.IssueSeverity.Error or Hl7.Fhir.Model.OperationOutcome.IssueSeverity.Fatal),
            c => Assert.InRange(c.HttpStatus, 400, 599));
    }
}
