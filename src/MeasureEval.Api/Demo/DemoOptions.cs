namespace MeasureEval.Api.Demo;

/// <summary>Configuration section <c>Demo</c>: load the invented demo population at start.</summary>
public sealed class DemoOptions
{
    public const string Section = "Demo";

    /// <summary>The bare <c>--demo</c> flag sets this.</summary>
    public bool Load { get; set; }

    /// <summary>Folder of transaction bundles; empty = <c>fhir-bundles/demo</c> of the repository the service runs from.</summary>
    public string Directory { get; set; } = "";
}
