namespace MeasureEval.Analytics.Reports;

/// <summary>
/// The Okabe–Ito colour-blind-safe palette (Okabe M, Ito K, "Color Universal Design", 2002/2008). Colour never carries
/// meaning alone in the report: every mark also has a shape, a line style or a pattern, and a text label.
/// </summary>
internal static class Palette
{
    public const string Black = "#000000";
    public const string Orange = "#E69F00";
    public const string SkyBlue = "#56B4E9";
    public const string BluishGreen = "#009E73";
    public const string Blue = "#0072B2";
    public const string Vermillion = "#D55E00";
    public const string ReddishPurple = "#CC79A7";
    public const string Grey = "#595959";
    public const string LightGrey = "#D9D9D9";
}
