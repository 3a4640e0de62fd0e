/**
 * The report's style sheet, inlined in the page: system fonts only, a reading column, quiet
 * tables, and print rules (no navigation, sections that do not break inside a figure, black
 * text on white).
 */
import { FONT_STACK, GRID, INK, MONO_STACK, MUTED, OKABE_ITO } from './theme.js';

export const STYLES = `
:root {
  --ink: ${INK};
  --muted: ${MUTED};
  --paper: #fbfaf7;
  --panel: #ffffff;
  --rule: ${GRID};
  --accent: ${OKABE_ITO.blue};
  --ok: ${OKABE_ITO.bluishGreen};
  --bad: ${OKABE_ITO.vermillion};
  --warn: ${OKABE_ITO.orange};
}
* { box-sizing: border-box; }
html { background: var(--paper); }
body {
  margin: 0; color: var(--ink); background: var(--paper);
  font: 15px/1.5 ${FONT_STACK};
  -webkit-font-smoothing: antialiased;
}
.page { max-width: 940px; margin: 0 auto; padding: 28px 28px 64px; }
code, .hash { font-family: ${MONO_STACK}; font-size: 0.86em; }
.hash { word-break: break-all; }
.muted { color: var(--muted); font-weight: normal; }
a { color: var(--accent); }

/* masthead */
.masthead { border-top: 6px solid var(--ink); padding-top: 14px; margin-bottom: 18px; }
.eyebrow { text-transform: uppercase; letter-spacing: 0.12em; font-size: 11.5px; color: var(--muted); margin: 0; }
h1 { font-size: 30px; line-height: 1.15; margin: 4px 0 6px; font-weight: 700; letter-spacing: -0.01em; overflow-wrap: anywhere; }
.meta { color: var(--muted); margin: 0 0 14px; overflow-wrap: anywhere; }
.meta span + span::before { content: "  ·  "; white-space: pre; color: #b5afa4; }

/* verdict */
.status { border-radius: 4px; padding: 10px 14px; margin: 12px 0; border: 1px solid; }
.status.ok { background: #eaf6f1; border-color: var(--ok); }
.status.bad { background: #fcece4; border-color: var(--bad); }
.status strong { font-size: 15.5px; }
.status.ok strong { color: #006b4f; }
.status.bad strong { color: #a63c00; }

/* key numbers */
.figures { display: grid; grid-template-columns: repeat(auto-fit, minmax(165px, 1fr)); gap: 10px; margin: 16px 0; }
.figure-card { background: var(--panel); border: 1px solid var(--rule); border-radius: 4px; padding: 10px 12px; }
.figure-card .label { font-size: 12px; color: var(--muted); display: block; }
.figure-card .value { font-size: 22px; font-weight: 650; display: block; font-variant-numeric: tabular-nums; }
.figure-card .range { font-size: 12.5px; color: var(--muted); font-variant-numeric: tabular-nums; }

.warnings { border-left: 4px solid var(--warn); background: #fff7e6; padding: 8px 14px; margin: 12px 0; }
.warnings h2 { font-size: 14px; margin: 2px 0 4px; border: 0; padding: 0; }
.warnings ul { margin: 0; padding-left: 18px; }
.warnings li { margin: 3px 0; overflow-wrap: anywhere; }
.caution-strip { font-size: 13.5px; color: var(--muted); border-left: 4px solid var(--muted); padding: 2px 12px; margin: 12px 0; }

/* contents */
nav.contents { border-top: 1px solid var(--rule); border-bottom: 1px solid var(--rule); padding: 8px 0; margin: 18px 0 8px; }
nav.contents ol { margin: 0; padding: 0; list-style: none; display: flex; flex-wrap: wrap; gap: 4px 18px; counter-reset: toc; }
nav.contents li { counter-increment: toc; font-size: 13.5px; }
nav.contents li::before { content: counter(toc) ". "; color: var(--muted); }
nav.contents a { text-decoration: none; }

/* sections */
main { counter-reset: sec; }
section { margin-top: 34px; counter-increment: sec; }
section > h2 { font-size: 20px; margin: 0 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); }
section > h2::before { content: counter(sec); display: inline-block; min-width: 1.6em; color: var(--accent); font-variant-numeric: tabular-nums; }
h3 { font-size: 15.5px; margin: 20px 0 6px; }
h4 { font-size: 14px; margin: 14px 0 4px; font-weight: 600; }
p { margin: 8px 0; }
.note { color: var(--muted); font-style: italic; }
.caption, figcaption { font-size: 13.5px; color: var(--muted); }
.footnote { font-size: 12.5px; color: var(--muted); }

/* figures */
figure.chart { margin: 10px 0 14px; background: var(--panel); border: 1px solid var(--rule); border-radius: 4px; padding: 10px 12px 8px; }
figure.chart figcaption { margin-top: 6px; }
.svg-box svg { display: block; max-width: 100%; height: auto; }
.svg-box svg text { font-family: ${FONT_STACK}; }
.pair { display: grid; grid-template-columns: 1.45fr 1fr; gap: 10px; }
.pair figure.chart { margin: 0; }
.mixing-row { margin-bottom: 10px; }

/* keys */
ul.key { list-style: none; padding: 0; margin: 0 0 6px; display: flex; flex-wrap: wrap; gap: 2px 16px; font-size: 12.5px; }
ul.key li { display: inline-flex; align-items: center; gap: 6px; }
.swatch { display: inline-block; width: 22px; height: 10px; flex: none; }
.swatch-line { height: 0; border-top: 2.5px solid; }
.swatch-dash { height: 0; border-top: 2px dashed; }
.swatch-dot { width: 7px; height: 7px; border-radius: 50%; }
.swatch-band, .swatch-shade { height: 11px; }

/* tables */
.table-wrap { overflow-x: auto; margin: 10px 0; }
table { border-collapse: collapse; width: 100%; font-size: 13.5px; background: var(--panel); }
caption { text-align: left; font-weight: 600; padding: 0 0 6px; font-size: 13.5px; }
th, td { padding: 5px 9px; border-bottom: 1px solid var(--rule); vertical-align: top; text-align: left; }
thead th { border-bottom: 2px solid var(--ink); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td { overflow-wrap: anywhere; }
tr.fail td, tr.weak td { background: #fdf1ea; }
.flag { display: inline-block; font-size: 11.5px; padding: 0 6px; border: 1px solid var(--bad); color: #a63c00; border-radius: 3px; white-space: nowrap; }

/* details */
.details-grid { display: grid; grid-template-columns: 1fr 1fr; gap: 4px 28px; }
dl.pairs { display: grid; grid-template-columns: max-content 1fr; gap: 3px 12px; margin: 6px 0; font-size: 13.5px; }
dl.pairs dt { color: var(--muted); }
dl.pairs dd { margin: 0; overflow-wrap: anywhere; }
details { margin: 6px 0; font-size: 13.5px; }
summary { cursor: pointer; color: var(--accent); }
ul.sources { margin: 4px 0; padding-left: 18px; }

.caution-box { border: 1px solid var(--ink); border-left-width: 6px; padding: 8px 16px; background: var(--panel); }
.caution-box li { margin: 5px 0; }
footer { margin-top: 40px; font-size: 12.5px; color: var(--muted); border-top: 1px solid var(--rule); padding-top: 8px; }

@media (max-width: 720px) {
  .pair, .details-grid { grid-template-columns: 1fr; }
  .page { padding: 16px; }
}

@media print {
  @page { size: A4; margin: 14mm 12mm; }
  html, body { background: #ffffff; }
  body { font-size: 10.5pt; color: #000000; }
  .page { max-width: none; padding: 0; }
  nav.contents { display: none; }
  section { break-before: auto; }
  figure.chart, table, .status, .caution-box, .mixing-row, .figure-card { break-inside: avoid; }
  h2, h3, h4 { break-after: avoid; }
  figure.chart, .figure-card { border-color: #bbbbbb; }
  .figures { grid-template-columns: repeat(5, 1fr); }
  details > *:not(summary) { display: block; }
  details { display: block; }
  summary { color: #000000; }
  a { color: #000000; text-decoration: none; }
  .status, .warnings, .figure-card, tr.fail td, tr.weak td, .swatch, .svg-box svg { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
`;
