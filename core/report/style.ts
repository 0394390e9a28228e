/** The report's stylesheet (inlined; system fonts only, so nothing is fetched). */
export const REPORT_CSS = `
:root{--paper:#f3f1ea;--card:#fffdf7;--ink:#1f2a26;--muted:#5f6b66;--line:#d8d3c4;--accent:#1f6e78;--warm:#b8672a;--bad:#b23a34}
*{box-sizing:border-box}
body{margin:0;background:var(--paper);color:var(--ink);font:15px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif}
header.top{padding:22px 32px 10px;border-bottom:3px solid var(--accent);background:var(--card)}
header.top h1{margin:0 0 4px;font-size:24px;letter-spacing:.2px}
header.top .meta{color:var(--muted);font-size:13px}
main{padding:18px 32px 40px;max-width:1500px;margin:0 auto}
section{margin:0 0 26px}
h2{font-size:17px;margin:0 0 10px;color:var(--accent);text-transform:uppercase;letter-spacing:.8px}
.caution{border-left:5px solid var(--warm);background:#fbf1e4;padding:10px 14px;margin:14px 0 22px;font-size:14px}
.figures{display:grid;grid-template-columns:repeat(auto-fill,minmax(190px,1fr));gap:10px}
.figure{background:var(--card);border:1px solid var(--line);border-radius:6px;padding:10px 12px}
.figure .label{color:var(--muted);font-size:12px;text-transform:uppercase;letter-spacing:.5px}
.figure .value{font-size:22px;font-weight:600}
.figure .unit{font-size:13px;color:var(--muted);margin-left:3px}
.figure .interval,.figure .note{font-size:12px;color:var(--muted)}
.viewer{position:relative;background:var(--card);border:1px solid var(--line);border-radius:6px;overflow:hidden}
#viewer-canvas{display:block;width:100%;height:560px;cursor:grab;touch-action:none}
.viewer-bar{display:flex;gap:14px;align-items:center;padding:8px 12px;border-bottom:1px solid var(--line);font-size:14px}
.viewer-bar select,.viewer-bar button{font:inherit;padding:3px 8px}
.viewer-bar .hint{color:var(--muted);font-size:12px;margin-left:auto}
#viewer-mode{position:absolute;right:10px;bottom:6px;margin:0;font-size:11px;color:var(--muted)}
#viewer-readout{position:absolute;left:12px;top:56px;margin:0;background:rgba(255,253,247,.92);border:1px solid var(--line);border-radius:5px;padding:4px 9px;font-size:12px}
#viewer-legend{position:absolute;left:12px;bottom:12px;background:rgba(255,253,247,.92);border:1px solid var(--line);border-radius:5px;padding:8px 10px;min-width:190px;font-size:12px}
.legend-title{font-weight:600;margin-bottom:4px}
.legend-ramp{height:12px;border-radius:2px}
.legend-ticks{display:flex;justify-content:space-between}
.legend-cats{list-style:none;margin:0;padding:0;columns:2}
.swatch{display:inline-block;width:11px;height:11px;border-radius:2px;margin-right:5px;vertical-align:-1px}
.plots{display:grid;grid-template-columns:repeat(auto-fill,minmax(470px,1fr));gap:14px}
figure.plot{margin:0;background:var(--card);border:1px solid var(--line);border-radius:6px;padding:8px}
figure.plot figcaption{font-weight:600;font-size:14px;margin:0 0 4px 4px}
figure.plot .note{font-size:12px;color:var(--muted);margin:2px 4px}
.plot-svg{width:100%;height:auto}
.plot-svg .grid{stroke:#e7e2d4;stroke-width:1}
.plot-svg .frame{fill:none;stroke:#a9a390}
.plot-svg text{font-size:11px;fill:var(--muted)}
.plot-svg .axis-title{font-size:12px;fill:var(--ink)}
.plot-svg .bar,.plot-svg .swatch.bar{fill:var(--accent);opacity:.85}
.plot-svg .interval,.plot-svg .swatch.interval{fill:var(--warm);opacity:.22}
.plot-svg .ref line{stroke:var(--ink);stroke-dasharray:4 3;stroke-width:1.3}
.plot-svg .estimate line{stroke:var(--warm);stroke-width:2.4}
.plot-svg .estimate text{fill:var(--warm);font-weight:600}
.plot-svg .dot,.plot-svg .swatch.dot{fill:var(--accent)}
.plot-svg .dot.faint{opacity:.35}
.plot-svg .dot.strong{fill:var(--warm)}
.plot-svg .trace{fill:none;stroke:var(--warm);stroke-width:2}
.plot-svg .swatch.trace{fill:var(--warm)}
.plot-svg .legend-box{fill:rgba(255,253,247,.9);stroke:var(--line)}
.plot-empty .empty{color:var(--muted);padding:30px 10px}
table{border-collapse:collapse;background:var(--card);font-size:13px}
th,td{border:1px solid var(--line);padding:4px 9px;text-align:right}
th{background:#ece8dc;text-align:center}
td.key,th.key{text-align:left;font-family:ui-monospace,Menlo,Consolas,monospace}
td.text{text-align:left}
.options{display:grid;grid-template-columns:repeat(auto-fill,minmax(340px,1fr));gap:12px;align-items:start}
.warnings li{color:var(--bad)}
footer{color:var(--muted);font-size:12px;padding:0 32px 30px}
`;
