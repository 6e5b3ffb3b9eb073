namespace MeasureEval.Analytics.Reports;

/// <summary>The page's only stylesheet, inline: system fonts, no external asset, a print layout.</summary>
internal static class ReportStyles
{
    public const string Css = """
        :root { color-scheme: light; }
        body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; color: #1a1a1a; margin: 24px auto; max-width: 960px; padding: 0 16px; line-height: 1.4; }
        h1 { font-size: 1.6rem; margin-bottom: 0.2rem; }
        h2 { font-size: 1.2rem; border-bottom: 2px solid #1a1a1a; padding-bottom: 2px; margin-top: 2rem; }
        .meta { color: #404040; margin-top: 0; }
        .caution { border-left: 6px solid #E69F00; background: #FFF8E6; padding: 8px 12px; }
        .headline { font-size: 1.25rem; }
        .headline strong { font-size: 2rem; }
        table { border-collapse: collapse; width: 100%; margin: 8px 0 16px; font-size: 0.9rem; }
        th, td { border: 1px solid #BFBFBF; padding: 4px 6px; text-align: left; vertical-align: top; }
        td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
        caption { text-align: left; font-weight: bold; padding-bottom: 4px; }
        svg.chart { width: 100%; height: auto; font-size: 12px; font-family: inherit; }
        .legend { font-size: 0.85rem; color: #404040; }
        .legend svg { vertical-align: middle; }
        .methods { font-size: 0.85rem; color: #404040; }
        nav a { margin-right: 1rem; }
        a { color: #0072B2; }
        @media print {
          body { margin: 0; max-width: none; font-size: 10pt; }
          nav, .downloads { display: none; }
          section { break-inside: avoid; page-break-inside: avoid; }
          h2 { break-after: avoid; }
          a { color: inherit; text-decoration: none; }
          .caution { background: none; }
        }
        """;
}
