namespace MeasureEval.Analytics.Reports;

/// <summary>The links a report page carries (built by the host, which knows its routes); each already URL-escaped.</summary>
/// <param name="GapsFor">The care-gap export of one panel code, or of everyone for null.</param>
public sealed record ReportLinks(string Index, string Json, string Csv, Func<string?, string> GapsFor);
