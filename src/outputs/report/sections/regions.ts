/**
 * The sections of the page of a multi-region run (regions-page.ts): regions ranked by the
 * probability that R_t > 1 on their last observed day (from regions.csv, where the fit wrote
 * it from the draws), R_t of the leading regions as small multiples on shared axes, the
 * regions that failed or did not converge, run details and cautions.
 */
import { existsSync } from 'node:fs';
import { join as joinPath } from 'node:path';
import type { RegionsRow } from '../../../regions/combined.js';
import type { RegionsRun } from '../../../regions/run-record.js';
import { smallMultiplesSpec, type PanelSeries } from '../charts/small-multiples.js';
import { readTextTable } from '../csv.js';
import { figure, html, note, num, table, type Column, type Html, type KeyEntry } from '../html.js';
import { quantileTable } from '../run-folder.js';
import { quantileColumn } from '../../stats.js';
import type { ChartSpec } from '../render.js';
import { bandLevels, fanSeries } from '../series.js';
import { BAND_OPACITY, COLOURS } from '../theme.js';
import { pairs, showValue } from './details.js';

/** What the sections of the regions page read. */
export interface RegionsFolder {
  dir: string;
  run: RegionsRun;
  levels: number[];
  /** regions.csv */
  rows: RegionsRow[];
}

export interface RegionsContext {
  folder: RegionsFolder;
  chart(spec: ChartSpec): Promise<string>;
}

export interface RegionsSection {
  id: string;
  title: string;
  body: Html;
}

/** Panels in the small multiples: more would make the page slow to open and hard to read. */
export const MAX_PANELS = 36;
/** The small multiples' y axis stops here: higher R_t values are cut at the edge. */
const Y_CAP = 3;

/** P(R_t > 1) of a row, NaN when it has none (a failed region). */
export function probability(row: RegionsRow): number {
  const v = row.get('prob_rt_above_1');
  return v === '' ? NaN : Number(v);
}

/**
 * Regions from the most to the least likely to be growing: fitted regions by P(R_t > 1),
 * highest first (ties by name), then the failed ones by name.
 */
export function rankRegions(rows: readonly RegionsRow[]): RegionsRow[] {
  const key = (r: RegionsRow) => (r.status === 'failed' || Number.isNaN(probability(r)) ? -Infinity : probability(r));
  return [...rows].sort((a, b) => key(b) - key(a) || (a.region < b.region ? -1 : a.region > b.region ? 1 : 0));
}

function statusCell(row: RegionsRow): Html {
  if (row.status === 'ok') return html`converged`;
  if (row.status === 'not_converged') return html`<span class="flag">NOT converged</span>`;
  return html`<span class="flag">failed</span>`;
}

/** The region's name, linked to its own report when the folder has one. */
function regionCell(folder: RegionsFolder, row: RegionsRow): Html {
  const report = joinPath(folder.dir, 'regions', row.folder, 'report.html');
  // the folder name is made of a-z, 0-9 and "-" only (regions/folders.ts), so it is safe in a link
  return existsSync(report) ? html`<a href="regions/${row.folder}/report.html">${row.region}</a>` : html`${row.region}`;
}

export async function rankingSection(ctx: RegionsContext): Promise<RegionsSection> {
  const { folder } = ctx;
  const b = bandLevels(folder.levels);
  const q = (row: RegionsRow, i: number) => Number(row.get(`rt_${quantileColumn(folder.levels[i]!)}`));
  const mid = (row: RegionsRow) => (b.mid >= 0 ? q(row, b.mid) : Number(row.get('rt_mean')));
  const ranked = rankRegions(folder.rows);
  const columns: Column<RegionsRow>[] = [
    { head: '#', numeric: true, cell: (r) => String(ranked.indexOf(r) + 1) },
    { head: 'region', cell: (r) => regionCell(folder, r) },
    { head: 'last day', cell: (r) => r.get('last_date') || '—' },
    {
      head: `R_t, ${b.midName} [${b.outerName}]`,
      numeric: true,
      cell: (r) => (r.status === 'failed' ? '—' : `${num(mid(r))} [${num(q(r, b.outer[0]))}, ${num(q(r, b.outer[1]))}]`),
    },
    { head: 'P(R_t > 1)', numeric: true, cell: (r) => (Number.isNaN(probability(r)) ? '—' : num(probability(r), 2)) },
    { head: 'status', cell: statusCell },
  ];
  const body = html`<p>Each region is fitted on its own. P(R_t &gt; 1) is the share of a region's posterior draws in which the effective reproduction number exceeds 1 on its last observed day: the probability, under the model, that its epidemic was growing then. Recent days rest on incomplete reports, so the last day is the least certain.</p>
${table(`${ranked.length} regions, most likely growing first`, columns, ranked, (r) => (r.status === 'ok' ? null : 'fail'))}`;
  return { id: 'ranking', title: 'Regions ranked by P(R_t > 1)', body };
}

/** The dated R_t rows of a region's summary.csv, or null when its folder lacks one. */
function regionSeries(folder: RegionsFolder, row: RegionsRow): PanelSeries | null {
  const path = joinPath(folder.dir, 'regions', row.folder, 'summary.csv');
  const t = readTextTable(path, path);
  if (t === null) return null;
  return { name: row.region, points: fanSeries(quantileTable(t, false), 'effective_reproduction') };
}

export async function smallMultiplesSection(ctx: RegionsContext): Promise<RegionsSection> {
  const { folder } = ctx;
  const fitted = rankRegions(folder.rows).filter((r) => r.status !== 'failed');
  const shown = fitted.slice(0, MAX_PANELS);
  const panels = shown.map((r) => regionSeries(folder, r)).filter((p): p is PanelSeries => p !== null && p.points.length > 0);
  if (panels.length === 0) return { id: 'small-multiples', title: 'R_t across regions', body: note('No region has fitted results to draw.') };
  const lows = panels.flatMap((p) => p.points.map((x) => x.outerLo)).filter(Number.isFinite);
  const highs = panels.flatMap((p) => p.points.map((x) => x.outerHi)).filter(Number.isFinite);
  const top = Math.max(...highs);
  const yDomain: [number, number] = [
    Math.max(0, Math.min(0.8, Math.floor(Math.min(...lows) * 10) / 10)),
    Math.min(Y_CAP, Math.max(1.2, Math.ceil(top * 10) / 10)),
  ];
  const svg = await ctx.chart(
    smallMultiplesSpec({
      panels,
      yTitle: 'R_t',
      reference: 1,
      yDomain,
      columns: 3,
      description: `Effective reproduction number R_t over time in ${panels.length} regions, one panel each, on shared axes`,
    }),
  );
  const b = bandLevels(folder.levels);
  const key: KeyEntry[] = [
    { kind: 'line', colour: COLOURS.estimate, label: `R_t, ${b.midName}` },
    ...(b.innerName === null ? [] : [{ kind: 'band' as const, colour: COLOURS.estimate, opacity: BAND_OPACITY.inner + 0.1, label: `${b.innerName} interval` }]),
    { kind: 'band', colour: COLOURS.estimate, opacity: BAND_OPACITY.outer + 0.08, label: `${b.outerName} interval` },
    { kind: 'dash', colour: COLOURS.reference, label: 'R = 1' },
  ];
  const more = fitted.length > panels.length ? ` The ${panels.length} regions most likely growing are drawn, of ${fitted.length} fitted; the table above lists every region.` : '';
  const cut = top > Y_CAP ? ` The axis stops at ${Y_CAP}: higher values are cut at the top edge.` : '';
  const caption = html`One panel per region, in the order of the table (most likely growing first), all on the same axes, so heights compare directly. Above the dashed line the epidemic grows, below it shrinks.${more}${cut}`;
  return { id: 'small-multiples', title: 'R_t across regions', body: figure(svg, { key, caption, className: 'multiples' }) };
}

export async function problemsSection(ctx: RegionsContext): Promise<RegionsSection> {
  const { folder } = ctx;
  const failed = folder.rows.filter((r) => r.status === 'failed');
  const slow = folder.rows.filter((r) => r.status === 'not_converged');
  const failedTable =
    failed.length === 0
      ? note('No region failed.')
      : table<RegionsRow>(`${failed.length} region${failed.length === 1 ? '' : 's'} failed: no outputs; the others are complete`, [
          { head: 'region', cell: (r) => r.region },
          { head: 'why', cell: (r) => r.get('message') },
        ], failed);
  const slowList =
    slow.length === 0
      ? note('Every fitted region met the convergence rule.')
      : html`<p><strong>${slow.length} region${slow.length === 1 ? '' : 's'} did NOT converge</strong> (their chains may not describe the posterior; run longer before using them): ${slow.map((r, i) => html`${i > 0 ? ', ' : ''}${regionCell(folder, r)}`)}.</p>`;
  return { id: 'problems', title: 'Failed and unconverged regions', body: html`${failedTable}${slowList}` };
}

export async function regionsDetailsSection(ctx: RegionsContext): Promise<RegionsSection> {
  const { run } = ctx.folder;
  const f = run.files;
  const shard = run.selection.shard;
  const set = run.priors.set as { name?: unknown; description?: unknown };
  const body = html`${pairs([
    ['data file', f.cases.file],
    ['SHA-256 of the data file', html`<code class="hash">${f.cases.sha256}</code>`],
    ['region column', f.cases.region_column],
    ['regions', `${run.counts.regions} in this folder, ${run.selection.regions} selected, ${f.cases.regions_in_file} in the file`],
    ['shard', shard === null ? (run.merged_from.length > 0 ? `merged from ${run.merged_from.length} shards` : '— (all selected regions)') : `${shard.index} of ${shard.count}`],
    ['populations', f.populations === null ? 'from the "population" column of the data file' : html`${f.populations.file} <code class="hash">${f.populations.sha256}</code>`],
    ['forecast scenarios', f.scenarios === null ? '—' : html`${f.scenarios.file} <code class="hash">${f.scenarios.sha256}</code>`],
    ['prior set', html`${showValue(set.name)} <span class="muted">(from ${run.priors.file})</span>`],
    ['seed', html`${showValue(run.options.seed)} <span class="muted">(each region's own seed, derived from it and the region's name, is in run.json)</span>`],
    ['version', `waxwane ${run.version}`],
  ])}
<details><summary>Options</summary>${pairs(Object.entries(run.options).map(([k, v]) => [html`<code>${k}</code>`, showValue(v)] as const))}</details>
${run.merged_from.length === 0 ? '' : html`<details><summary>Shards merged (${run.merged_from.length})</summary><ul>${run.merged_from.map((m) => html`<li>${m.folder} <span class="muted">(${m.shard === null ? 'whole run' : `shard ${m.shard.index}/${m.shard.count}`})</span></li>`)}</ul></details>`}
${run.warnings.length === 0 ? '' : html`<details><summary>Warnings about the run as a whole (${run.warnings.length})</summary><ul>${run.warnings.map((w) => html`<li>${w}</li>`)}</ul></details>`}`;
  return { id: 'details', title: 'Run details', body };
}

export async function regionsCautionsSection(ctx: RegionsContext): Promise<RegionsSection> {
  const { run } = ctx.folder;
  return {
    id: 'cautions',
    title: 'Cautions for public-health use',
    body: html`<div class="caution-box">
<p><strong>${run.caution}</strong></p>
<ul>
<li>Each region is a separate model fitted to its own counts: nothing is shared between regions, and movement of people between them is not modelled.</li>
<li>Small regions with few cases give wide intervals; a probability near 0.5 means the data cannot tell growth from decline, not that the epidemic is stable.</li>
<li>The last days rest on incomplete reports: a ranking by the last day moves as later reports arrive.</li>
<li>Regions that did not converge or failed are flagged; do not use their numbers. Each region's own report (linked from the table) has its diagnostics and warnings.</li>
<li>This page informs decisions; it does not replace local public-health authority and the judgement of trained epidemiologists.</li>
</ul>
</div>`,
  };
}
