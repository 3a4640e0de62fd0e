/**
 * The report of a multi-region run (`waxwane fit` over several regions, or `waxwane merge`):
 * one page for the run folder, beside the regions' own reports. It reads run.json and
 * regions.csv (where the fit wrote each region's probability that R_t > 1 on its last day),
 * and the R_t rows of the regions it draws from their own summary.csv. Same page shell,
 * building blocks and chart rendering as the report of one run (fit-page.ts).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { WaxwaneError } from '../../errors.js';
import { writeFileAtomic } from '../../io/atomic.js';
import { COMBINED_FILES, parseRegionsCsv } from '../../regions/combined.js';
import { readRegionsRun } from '../../regions/run-record.js';
import type { BuiltReport } from './fit-page.js';
import { html } from './html.js';
import { renderPage } from './page.js';
import { renderSvg } from './render.js';
import {
  probability,
  problemsSection,
  rankingSection,
  rankRegions,
  regionsCautionsSection,
  regionsDetailsSection,
  smallMultiplesSection,
  type RegionsContext,
  type RegionsFolder,
  type RegionsSection,
} from './sections/regions.js';

export const REGIONS_SECTIONS: ReadonlyArray<(ctx: RegionsContext) => Promise<RegionsSection>> = [
  rankingSection,
  smallMultiplesSection,
  problemsSection,
  regionsDetailsSection,
  regionsCautionsSection,
];

/**
 * Reads what the page shows from the folder of a multi-region run.
 *
 * @throws WaxwaneError when run.json or regions.csv is missing or malformed.
 */
export function readRegionsFolder(dir: string): RegionsFolder {
  const run = readRegionsRun(dir);
  const file = join(dir, COMBINED_FILES.regions);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch {
    throw new WaxwaneError(`${file}: missing or unreadable; the run is incomplete: fit again`);
  }
  const levels = run.options.quantiles as number[];
  return { dir, run, levels, rows: parseRegionsCsv(text, file, levels) };
}

function masthead(folder: RegionsFolder) {
  const { run, rows } = folder;
  const c = run.counts;
  const firsts = rows.map((r) => r.get('first_date')).filter((d) => d !== '').sort();
  const lasts = rows.map((r) => r.get('last_date')).filter((d) => d !== '').sort();
  const span = firsts.length === 0 ? 'no fitted region' : `${firsts[0]} to ${lasts[lasts.length - 1]}`;
  const shard = run.selection.shard;
  const growing = rows.filter((r) => r.status !== 'failed' && probability(r) > 0.9).length;
  const shrinking = rows.filter((r) => r.status !== 'failed' && probability(r) < 0.1).length;
  const top = rankRegions(rows).find((r) => r.status !== 'failed');
  const verdict =
    c.not_converged === 0 && c.failed === 0
      ? html`<div class="status ok" role="status"><strong><span aria-hidden="true">&#10003;</span> All ${c.regions} regions converged.</strong></div>`
      : html`<div class="status bad" role="alert"><strong><span aria-hidden="true">&#10007;</span> ${c.not_converged} region${c.not_converged === 1 ? '' : 's'} NOT converged, ${c.failed} failed</strong> (of ${c.regions}); they are flagged in the table. The other regions' results stand on their own.</div>`;
  return html`<p class="eyebrow">waxwane · transmission report · several regions</p>
<h1>${run.files.cases.file}: ${c.regions} region${c.regions === 1 ? '' : 's'}</h1>
<p class="meta"><span>${span}</span><span>prior set ${String((run.priors.set as { name?: unknown }).name ?? run.priors.file)}</span><span>seed ${String(run.options.seed)}</span>${shard === null ? '' : html`<span>shard ${shard.index} of ${shard.count}</span>`}${run.merged_from.length > 0 ? html`<span>merged from ${run.merged_from.length} shards</span>` : ''}</p>
${verdict}
<p class="caption">On each region's last observed day: ${growing} region${growing === 1 ? '' : 's'} with P(R_t &gt; 1) above 0.9, ${shrinking} below 0.1${top === undefined ? '' : html`; the most likely growing: ${top.region} (${probability(top).toFixed(2)})`}.</p>
<p class="caution-strip">${run.caution} <a href="#cautions">Cautions for public-health use</a>.</p>`;
}

/** Builds the page of a multi-region run folder. */
export async function buildRegionsReport(folder: RegionsFolder): Promise<BuiltReport> {
  const chartWarnings: string[] = [];
  const ctx: RegionsContext = { folder, chart: (spec) => renderSvg(spec, (w) => chartWarnings.push(w)) };
  const sections: RegionsSection[] = [];
  for (const f of REGIONS_SECTIONS) sections.push(await f(ctx));
  const page = renderPage({
    title: `${folder.run.files.cases.file}: ${folder.run.counts.regions} regions, transmission report (waxwane)`,
    masthead: masthead(folder),
    sections,
    footer: html`Written by waxwane ${folder.run.version} from run.json and regions.csv of this folder and the regions' own summary.csv; <code>waxwane report</code> writes it again. Each region's folder under regions/ has its own report. The page is self-contained: it loads nothing and runs no script.`,
  });
  return { html: page, chartWarnings };
}

/** Writes the page of the multi-region run folder `dir` to `out` (default `dir/report.html`); returns the path. */
export async function writeRegionsReport(dir: string, out: string = join(dir, 'report.html')): Promise<string> {
  const report = await buildRegionsReport(readRegionsFolder(dir));
  writeFileAtomic(out, report.html);
  return out;
}
