namespace MeasureEval.Api.Measures;

/// <summary>Where the checked-in measure definitions are read from.</summary>
public sealed class MeasureCatalogOptions
{
    public const string Section = "Measures";

    /// <summary>
    /// The measures directory. Relative paths resolve against the content root and, failing that, against each of its
    /// parent directories (so a host started from src/MeasureEval.Api finds the repository's measures/).
    /// </summary>
    public string Directory { get; set; } = "measures";
}
