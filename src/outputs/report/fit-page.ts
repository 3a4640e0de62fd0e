/**
 * The report of one run (fit, and later forecast): masthead with the verdict, the numbers of
 * the last day, warnings and the short caution, then one section per function in
 * {@link FIT_SECTIONS}. A comparison page would list its own section functions (scores table,
 * reproduction number under each prior set overlaid with fanChartSpec's several series) and
 * reuse renderPage, the charts and the building blocks.
 */
import { html, num, type Html } from './html.js';
import { renderPage } from './page.js';
import type { RunFolder } from './run-folder.js';
import { createContext, type SectionFunction } from './section.js';
import { bandLevels, lastRow, parameterRow } from './series.js';
import { countsSection } from './sections/counts.js';
import { reproductionSection, transmissionSection, infectionsSection } from './sections/trajectories.js';
import { growthSection, doublingTime } from './sections/growth.js';
import { forecastSection } from './sections/forecast.js';
import { parametersSection } from './sections/parameters.js';
import { diagnosticsSection, convergenceStatus } from './sections/diagnostics.js';
import { detailsSection } from './sections/details.js';
import { cautionsSection } from './sections/cautions.js';

/** The sections of a run's report, in page order. */
export const FIT_SECTIONS: readonly SectionFunction[] = [
  countsSection,
  reproductionSection,
  transmissionSection,
  infectionsSection,
  growthSection,
  forecastSection,
  parametersSection,
  diagnosticsSection,
  detailsSection,
  cautionsSection,
];

/** The name a run goes by: its region, else its data file. */
export function placeName(folder: RunFolder): string {
  return folder.run.input.region ?? folder.run.input.file;
}

function card(label: string, value: string, range: string): Html {
  return html`<div class="figure-card"><span class="label">${label}</span><span class="value">${value}</span><span class="range">${range}</span></div>`;
}

/** The numbers of the last observed day, each with its interval. */
function keyFigures(folder: RunFolder): Html {
  const { summary } = folder;
  const b = bandLevels(summary.levels);
  const mid = (q: number[], mean: number) => (b.mid >= 0 ? q[b.mid] : mean);
  const cards: Html[] = [];
  const daily: Array<[string, string, number]> = [
    ['effective_reproduction', 'R_t', 3],
    ['infections', 'new infections per day', 3],
    ['expected_reports', 'expected reports per day', 3],
  ];
  for (const [q, label, digits] of daily) {
    const r = lastRow(summary, q);
    if (r === undefined) continue;
    cards.push(card(label, num(mid(r.q, r.mean), digits), `${b.outerName}: ${num(r.q[b.outer[0]], digits)} to ${num(r.q[b.outer[1]], digits)}`));
  }
  const g = lastRow(summary, 'growth_rate');
  if (g !== undefined) {
    const d = doublingTime(mid(g.q, g.mean), g.q[b.outer[0]], g.q[b.outer[1]]);
    const what = d.kind === 'doubling' ? `doubles in ${num(d.mid)} days` : d.kind === 'halving' ? `halves in ${num(d.mid)} days` : 'no clear growth or decline';
    cards.push(card('growth rate per day', num(mid(g.q, g.mean)), what));
  }
  const a = parameterRow(summary, 'ascertainment');
  if (a !== undefined) cards.push(card('share of onsets reported', num(mid(a.q, a.mean), 2), `${b.outerName}: ${num(a.q[b.outer[0]], 2)} to ${num(a.q[b.outer[1]], 2)}`));
  return html`<div class="figures" aria-label="Estimates on the last observed day">${cards}</div>`;
}

function masthead(folder: RunFolder): Html {
  const { run } = folder;
  const b = bandLevels(folder.summary.levels);
  return html`<p class="eyebrow">waxwane · transmission report</p>
<h1>${placeName(folder)}</h1>
<p class="meta"><span>data ${run.input.file}</span><span>${run.input.firstDate} to ${run.input.lastDate} (${run.input.days} days)</span><span>population ${num(run.input.population, 10)}</span><span>prior set ${run.priorSet.name}</span><span>seed ${run.seed === null ? '—' : String(run.seed)}</span></p>
${convergenceStatus(folder)}
<p class="caption">On the last observed day, ${run.input.lastDate} (${b.midName} and ${b.outerName} credible interval):</p>
${keyFigures(folder)}
${run.warnings.length === 0 ? '' : html`<div class="warnings" role="note"><h2>Warnings from the run (${run.warnings.length})</h2><ul>${run.warnings.map((w) => html`<li>${w}</li>`)}</ul></div>`}
<p class="caution-strip">${run.caution} <a href="#cautions">Cautions for public-health use</a>.</p>`;
}

export interface BuiltReport {
  html: string;
  /** warnings of the chart library while rendering (none expected) */
  chartWarnings: string[];
}

/** Builds the report page of a run folder. */
export async function buildFitReport(folder: RunFolder): Promise<BuiltReport> {
  const chartWarnings: string[] = [];
  const ctx = createContext(folder, chartWarnings);
  const sections = [];
  for (const f of FIT_SECTIONS) sections.push(await f(ctx));
  const { run } = folder;
  const page = renderPage({
    title: `${placeName(folder)}: transmission report (waxwane)`,
    masthead: masthead(folder),
    sections,
    footer: html`Written by waxwane ${run.version} from the files of this run folder (run.json, summary.csv and the others listed under Run details); <code>waxwane report</code> writes it again. The page is self-contained: it loads nothing and runs no script.`,
  });
  return { html: page, chartWarnings };
}
