package dev.riskmin.diagnostics.report;

/**
 * The report's style sheet, inlined in its head. It uses only the browser's own sans-serif font and
 * contains neither '&lt;' nor '&amp;', so it is valid character data in XML as well as in HTML.
 */
final class Css {
    static final String STYLE = """
            body{font-family:"DejaVu Sans",Verdana,sans-serif;margin:16px;color:#222;background:#fafafa;font-size:14px}
            h1{font-size:22px;margin:0 0 4px}
            h2{font-size:18px;margin:28px 0 6px;border-bottom:1px solid #ccc;padding-bottom:3px}
            p.lead,p.read{color:#444;max-width:1300px;margin:4px 0 10px}
            .run{display:flex;flex-wrap:wrap;gap:24px;align-items:flex-start}
            table{border-collapse:collapse;font-size:13px;background:#fff}
            th,td{border:1px solid #ddd;padding:3px 8px;text-align:left;vertical-align:top}
            table.counts td{text-align:right;font-variant-numeric:tabular-nums}
            .plots{display:flex;flex-wrap:wrap;gap:16px;align-items:flex-start}
            figure.plot{margin:0;border:1px solid #ddd;background:#fff;padding:8px;width:640px}
            figcaption{font-weight:bold;font-size:14px;margin-bottom:2px}
            div.test{width:658px}
            div.actions{font-size:12px;color:#333;overflow-wrap:anywhere}
            ol.actions{margin:2px 0;padding-left:22px}
            p.empty{color:#777;font-style:italic;margin:8px 0}
            p.note,p.latest{font-size:12px;color:#555;margin:4px 0}
            details.data{font-size:11px;color:#555}
            details.data table{font-size:11px}
            ul.legend{list-style:none;padding:0;margin:4px 0 2px;font-size:12px;display:flex;flex-wrap:wrap;gap:2px 16px}
            ul.legend li{display:flex;align-items:center;gap:4px}
            ul.legend li.missing{color:#888;font-style:italic}
            .verdict{background:#fff;border:1px solid #ddd;padding:10px 14px;max-width:1300px}
            .condition{display:inline-block;font-weight:bold;font-size:16px;padding:3px 10px;border-radius:4px;color:#fff;background:#666;margin:0 10px 0 0}
            .c-converged{background:#1b7f4b}
            .c-still_descending{background:#0072B2}
            .c-noise_dominated{background:#b85c00}
            .c-step_too_large{background:#c0392b}
            .c-diverged{background:#8e1b1b}
            .when{display:inline-block;color:#555;margin:0}
            .summary{font-size:15px;max-width:1250px}
            .advice{font-size:15px;max-width:1250px}
            p.figures-title{font-weight:bold;margin:12px 0 4px}
            dl.figures{display:grid;grid-template-columns:repeat(4,300px);gap:0;margin:0;font-size:13px}
            dl.figures div{display:flex;justify-content:space-between;border-bottom:1px solid #eee;padding:2px 10px 2px 0;margin-right:14px}
            dl.figures dt{font-weight:bold}
            dl.figures dd{margin:0;font-variant-numeric:tabular-nums}
            footer{margin-top:28px;font-size:12px;color:#555;max-width:1300px}
            svg.chart{display:block}
            svg.chart .area{fill:#fff;stroke:#888}
            svg.chart .grid line.major{stroke:#e4e4e4}
            svg.chart .grid line.minor{stroke:#f1f1f1}
            svg.chart .grid line.zero{stroke:#888;stroke-dasharray:3 3}
            svg.chart text{font-family:"DejaVu Sans",Verdana,sans-serif}
            svg.chart .ticks text{font-size:11px;fill:#333}
            svg.chart .ticks text.y{text-anchor:end}
            svg.chart .ticks text.x{text-anchor:middle}
            svg.chart .ticks line.tick{stroke:#888}
            svg.chart line.epoch{stroke:#888}
            svg.chart text.epoch{font-size:10px;fill:#666;text-anchor:middle}
            svg.chart text.epoch-title{font-size:10px;fill:#666;text-anchor:end}
            svg.chart .axis-title{font-size:12px;fill:#222;text-anchor:middle}
            svg polyline{fill:none;stroke-width:1.6;stroke-linejoin:round}
            svg polyline.faint{stroke-width:1;stroke-opacity:.5}
            svg polyline.dashed{stroke-dasharray:6 4;stroke-width:1.4}
            svg polyline.points_line{stroke-width:1.3}
            svg line.mark{stroke-dasharray:4 3;stroke-width:1.3}
            svg .series rect{fill-opacity:.8}
            svg.swatch{flex:none}
            """;

    private Css() {
    }
}
