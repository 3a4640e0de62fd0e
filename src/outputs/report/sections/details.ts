/**
 * Run details, for whoever must reproduce or audit the run: the input and its hash, the prior
 * set with its description, sources and model settings, every option, the seed, versions,
 * timings and the files of the folder. Everything shown here comes from run.json and is
 * escaped; unknown fields added by later versions are listed too.
 */
import { readdirSync } from 'node:fs';
import { html, join, num, type Html, type HtmlValue } from '../html.js';
import { OPTIONAL_FILES } from '../run-folder.js';
import type { ReportContext, Section } from '../section.js';

/** A value of run.json for reading: arrays joined, objects as compact JSON. */
export function showValue(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : num(v, 6);
  if (typeof v === 'string') return v;
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (Array.isArray(v) && v.every((x) => typeof x !== 'object' || x === null)) return v.map(showValue).join(', ');
  return JSON.stringify(v);
}

/** A definition list from pairs. */
export function pairs(entries: ReadonlyArray<readonly [HtmlValue, HtmlValue]>): Html {
  return html`<dl class="pairs">${entries.map(([k, v]) => html`<dt>${k}</dt><dd>${v}</dd>`)}</dl>`;
}

/** Flattens an object to dotted keys: {delay: {mean: 5}} -> [["delay.mean", 5]]. */
function flatten(obj: Record<string, unknown>, prefix = ''): Array<[string, unknown]> {
  const out: Array<[string, unknown]> = [];
  for (const [k, v] of Object.entries(obj)) {
    if (v !== null && typeof v === 'object' && !Array.isArray(v)) out.push(...flatten(v as Record<string, unknown>, `${prefix}${k}.`));
    else out.push([`${prefix}${k}`, v]);
  }
  return out;
}

export async function detailsSection(ctx: ReportContext): Promise<Section> {
  const { run, dir } = ctx.folder;
  const raw = run.raw;
  const set = run.priorSet;
  let files: string[] = [];
  try {
    files = readdirSync(dir).filter((f) => !f.startsWith('.')).sort();
  } catch {
    files = [];
  }
  const missing = OPTIONAL_FILES.filter((f) => !files.includes(f));
  const obj = (v: unknown): Record<string, unknown> => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {});
  const input = pairs([
    ['data file', run.input.file],
    ['SHA-256 of the data file', html`<code class="hash">${run.input.sha256}</code>`],
    ['region', run.input.region ?? '— (the file has one series)'],
    ['days', `${run.input.firstDate} to ${run.input.lastDate} (${run.input.days} days)`],
    ['population', num(run.input.population, 10)],
  ]);
  const priors = html`${pairs([
    ['prior set', html`${set.name} <span class="muted">(from ${run.priorFile})</span>`],
    ['description', set.description],
  ])}<details><summary>Sources of the prior values (${set.sources.length})</summary><ul class="sources">${set.sources.map((s) => html`<li>${s}</li>`)}</ul></details>
<details><summary>Model settings</summary>${pairs(flatten(set.model as unknown as Record<string, unknown>).map(([k, v]) => [html`<code>${k}</code>`, showValue(v)] as const))}</details>
<details><summary>Prior specifications as recorded</summary>${pairs(flatten(set.priors as unknown as Record<string, unknown>).map(([k, v]) => [html`<code>${k}</code>`, showValue(v)] as const))}</details>`;
  const options = pairs([
    ['command', `waxwane ${run.command}`],
    ['seed', run.seed === null ? '—' : String(run.seed)],
    ...Object.entries(run.options)
      .filter(([k]) => k !== 'seed')
      .map(([k, v]) => [html`<code>${k}</code>`, showValue(v)] as const),
    ['threads', showValue(raw.threads)],
  ]);
  const versions = pairs(Object.entries(obj(raw.versions)).map(([k, v]) => [k, showValue(v)] as const));
  const timings = pairs(Object.entries(obj(raw.timings_seconds)).map(([k, v]) => [k, `${showValue(v)} s`] as const));
  const known = new Set(['tool', 'version', 'command', 'input', 'priors', 'options', 'threads', 'versions', 'timings_seconds', 'acceptance', 'converged', 'convergence_rule', 'identification', 'warnings', 'caution']);
  const other = Object.entries(raw).filter(([k]) => !known.has(k));
  return {
    id: 'details',
    title: 'Run details',
    body: html`<div class="details-grid">
<div><h3>Input</h3>${input}</div>
<div><h3>Options</h3>${options}</div>
<div><h3>Prior set</h3>${priors}</div>
<div><h3>Versions and timings</h3>${versions}${timings}${other.length === 0 ? '' : html`<h3>Other fields of run.json</h3>${pairs(other.map(([k, v]) => [html`<code>${k}</code>`, showValue(v)] as const))}`}</div>
</div>
<p>Files in the run folder: ${join(files.map((f) => html`<code>${f}</code>`), ', ')}.${missing.length === 0 ? '' : html` Not present: ${join(missing.map((f) => html`<code>${f}</code>`), ', ')}.`}</p>`,
  };
}
