/**
 * The report of a comparison of prior sets (`waxwane compare`): masthead with the ranking's
 * verdict and the fits' convergence, then the scores table and scores by horizon, the
 * reproduction number under each prior set overlaid, the estimates and what the data taught
 * side by side, how the backtest ran, run details and cautions. Built, like the report of a
 * run (fit-page.ts), from the folder's files alone, with the same page shell, charts and
 * building blocks.
 */
import { join } from 'node:path';
import { writeFileAtomic } from '../../io/atomic.js';
import { readCompareFolder, type CompareFolder } from './compare-folder.js';
import { html, num } from './html.js';
import { renderPage } from './page.js';
import { renderSvg, type ChartSpec } from './render.js';
import type { Section } from './section.js';
import { compareBacktestSection, compareScoresSection } from './sections/compare-scores.js';
import { compareEstimatesSection, compareReproductionSection } from './sections/compare-estimates.js';
import { compareCautionsSection, compareDetailsSection } from './sections/compare-details.js';

export { readCompareFolder, type CompareFolder };

export interface CompareContext {
  folder: CompareFolder;
  chart(spec: ChartSpec): Promise<string>;
}

export type CompareSectionFunction = (ctx: CompareContext) => Promise<Section>;

/** The sections of a comparison report, in page order. */
export const COMPARE_SECTIONS: readonly CompareSectionFunction[] = [
  compareScoresSection,
  compareReproductionSection,
  compareEstimatesSection,
  compareBacktestSection,
  compareDetailsSection,
  compareCautionsSection,
];

function placeName(folder: CompareFolder): string {
  return folder.input.region ?? folder.input.file;
}

function masthead(folder: CompareFolder) {
  const { input } = folder;
  const best = folder.ranking[0];
  const second = folder.ranking[1];
  const full = folder.fits.filter((f) => f.fit === 'all');
  const failing = full.filter((f) => !f.converged).map((f) => f.priorSet);
  const verdict =
    best === undefined
      ? ''
      : html`<p class="caption">Best forecasts of the backtest, by the mean weighted interval score:</p>
<div class="figures" aria-label="Ranking of the prior sets">${folder.ranking.map(
          (r) =>
            html`<div class="figure-card"><span class="label">${r.rank === 1 ? 'ranked first' : `rank ${r.rank}`}</span><span class="value">${r.priorSet}</span><span class="range">mean WIS ${num(r.wis, 4)}${r.rank === 1 ? '' : html` (+${num(r.wisVsBest, 2)} ± ${num(r.wisVsBestSe, 2)})`}</span></div>`,
        )}</div>${
          second !== undefined && Number.isFinite(second.wisVsBestSe) && second.wisVsBest < 2 * second.wisVsBestSe
            ? html`<p class="caption">${best.priorSet} and ${second.priorSet} differ by less than two standard errors: no clear winner on these data.</p>`
            : ''
        }`;
  const status =
    failing.length === 0
      ? html`<div class="status ok" role="status"><strong><span aria-hidden="true">&#10003;</span> Every fit on all days converged.</strong> ${full.length} prior sets; the rule: every R-hat at most 1.01, bulk and tail ESS at least 400.</div>`
      : html`<div class="status bad" role="alert"><strong><span aria-hidden="true">&#10007;</span> NOT converged:</strong> the fit on all days under ${failing.join(', ')}. Its estimates below are not reliable; run longer (--warmup, --draws, --thin).</div>`;
  return html`<p class="eyebrow">waxwane · comparison of prior sets</p>
<h1>${placeName(folder)}</h1>
<p class="meta"><span>data ${input.file}</span><span>${input.firstDate} to ${input.lastDate} (${input.days} days)</span><span>population ${num(input.population, 10)}</span><span>prior sets ${folder.priorSets.map((p) => p.label).join(', ')}</span><span>${folder.origins.length} backtest origins, 1 to ${folder.horizon} days ahead</span></p>
${status}
${verdict}
${folder.warnings.length === 0 ? '' : html`<div class="warnings" role="note"><h2>Warnings from the run (${folder.warnings.length})</h2><ul>${folder.warnings.map((w) => html`<li>${w}</li>`)}</ul></div>`}
<p class="caution-strip">${folder.caution} <a href="#cautions">Cautions for public-health use</a>.</p>`;
}

export interface BuiltCompareReport {
  html: string;
  /** warnings of the chart library while rendering (none expected) */
  chartWarnings: string[];
}

/** Builds the report page of a comparison folder. */
export async function buildCompareReport(folder: CompareFolder): Promise<BuiltCompareReport> {
  const chartWarnings: string[] = [];
  const ctx: CompareContext = { folder, chart: (spec) => renderSvg(spec, (w) => chartWarnings.push(w)) };
  const sections: Section[] = [];
  for (const f of COMPARE_SECTIONS) sections.push(await f(ctx));
  const page = renderPage({
    title: `${placeName(folder)}: comparison of prior sets (waxwane)`,
    masthead: masthead(folder),
    sections,
    footer: html`Written by waxwane ${folder.version} from the files of this comparison folder (compare.json, ranking.csv, scores.csv, estimates.csv, identification.csv, fits.csv). The page is self-contained: it loads nothing and runs no script.`,
  });
  return { html: page, chartWarnings };
}

/** Writes the report of the comparison folder `dir` to `out` (default `dir/report.html`); returns the path. */
export async function writeCompareReport(dir: string, out: string = join(dir, 'report.html')): Promise<string> {
  const report = await buildCompareReport(readCompareFolder(dir));
  writeFileAtomic(out, report.html);
  return out;
}
