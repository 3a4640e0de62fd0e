/**
 * Parameters, prior against posterior: a table (prior family, prior and posterior median and
 * intervals, how much the data narrowed the spread) and the intervals drawn side by side.
 * Posterior intervals come from summary.csv; prior intervals are the quantiles of the prior
 * set recorded in run.json, at the same levels.
 */
import { compilePriors, type CompiledPrior } from '../../../model/priors.js';
import type { DispersionPrior, PositivePrior, PriorSet, UnitPrior } from '../../../model/prior-set.js';
import { normalQuantile } from '../../../util/stdlib.js';
import { priorPosteriorSpec, type IntervalPair } from '../charts/intervals.js';
import { figure, html, interval, note, num, table, type Column, type KeyEntry } from '../html.js';
import { WEAK_RATIO } from '../../identification.js';
import type { QuantileRow, RunFolder } from '../run-folder.js';
import type { ReportContext, Section } from '../section.js';
import { bandLevels, parameterRow } from '../series.js';
import { COLOURS } from '../theme.js';

/** Reader-facing names of the scalar parameters (MODEL.md section 4). */
export const PARAMETER_LABELS = {
  start_reproduction: 'R at the start (R_start)',
  walk_scale: 'walk scale (sigma)',
  ascertainment: 'ascertainment (rho)',
  dispersion: 'dispersion (phi)',
  seed_infected: 'initially infected (i0)',
  latent_days: 'mean latent period L, days',
  infectious_days: 'mean infectious period D, days',
} as const;

type Scalar = keyof typeof PARAMETER_LABELS;

function isScalar(p: string): p is Scalar {
  return Object.hasOwn(PARAMETER_LABELS, p);
}

type Spec = PositivePrior | UnitPrior | DispersionPrior;

/** The prior of a spec in words, e.g. "lognormal(median 1.5, sdlog 0.5)". */
export function describePrior(spec: Spec): string {
  switch (spec.family) {
    case 'lognormal':
      return `lognormal(median ${spec.median}, sdlog ${spec.sdlog})`;
    case 'half_normal':
      return `half-normal(scale ${spec.scale})`;
    case 'gamma':
      return `gamma(shape ${spec.shape}, rate ${spec.rate})`;
    case 'beta':
      return `beta(${spec.a}, ${spec.b})`;
    case 'inverse_sqrt_half_normal':
      return `1/sqrt(phi) ~ half-normal(scale ${spec.scale})`;
  }
}

export interface PriorEntry {
  parameter: string;
  label: string;
  description: string;
  quantile: (p: number) => number;
}

/** Every undated parameter of the run with a prior: the scalars, the weekday effects and the walk steps. */
export function priorEntries(set: PriorSet, parameters: readonly string[]): PriorEntry[] {
  const compiled = compilePriors(set.priors);
  const out: PriorEntry[] = [];
  for (const p of parameters) {
    if (isScalar(p)) {
      const prior: CompiledPrior = compiled[p];
      out.push({ parameter: p, label: PARAMETER_LABELS[p], description: describePrior(set.priors[p]), quantile: (q) => prior.quantile(q) });
    } else if (p.startsWith('weekday_')) {
      const sd = set.priors.weekday_sd;
      out.push({ parameter: p, label: `weekday effect, ${p.slice('weekday_'.length)} (log scale)`, description: `normal(0, ${sd})`, quantile: (q) => normalQuantile(q, 0, sd) });
    } else if (p.startsWith('walk_step[')) {
      out.push({ parameter: p, label: `walk step ${p.slice('walk_step'.length)}`, description: 'normal(0, 1)', quantile: (q) => normalQuantile(q, 0, 1) });
    }
  }
  return out;
}

interface Row {
  entry: PriorEntry;
  posterior: QuantileRow;
  ratio: number | null;
  weak: boolean;
}

function parameterNames(folder: RunFolder): string[] {
  return folder.summary.rows.filter((r) => r.date === '').map((r) => r.quantity);
}

export async function parametersSection(ctx: ReportContext): Promise<Section> {
  const { folder } = ctx;
  const levels = folder.summary.levels;
  const b = bandLevels(levels);
  const ident = new Map(folder.run.identification.map((i) => [i.parameter, i]));
  const rows: Row[] = [];
  for (const entry of priorEntries(folder.run.priorSet, parameterNames(folder))) {
    const posterior = parameterRow(folder.summary, entry.parameter);
    if (posterior === undefined) continue;
    const id = ident.get(entry.parameter);
    rows.push({ entry, posterior, ratio: id === undefined ? null : id.posteriorSd / id.priorSd, weak: id?.weak ?? false });
  }
  const scalars = rows.filter((r) => !r.entry.parameter.startsWith('walk_step['));
  const steps = rows.filter((r) => r.entry.parameter.startsWith('walk_step['));
  const mid = (r: QuantileRow) => (b.mid >= 0 ? r.q[b.mid] : r.mean);
  const priorAt = (e: PriorEntry, i: number) => e.quantile(levels[i]);
  const priorMid = (e: PriorEntry) => e.quantile(0.5);
  const columns: Column<Row>[] = [
    { head: 'parameter', cell: (r) => html`${r.entry.label}<br><code>${r.entry.parameter}</code>` },
    { head: 'prior', cell: (r) => r.entry.description },
    { head: html`prior median [${b.outerName}]`, numeric: true, cell: (r) => interval(priorMid(r.entry), priorAt(r.entry, b.outer[0]), priorAt(r.entry, b.outer[1])) },
    { head: html`posterior ${b.midName} [${b.outerName}]`, numeric: true, cell: (r) => interval(mid(r.posterior), r.posterior.q[b.outer[0]], r.posterior.q[b.outer[1]]) },
    {
      head: html`posterior sd / prior sd<sup>*</sup>`,
      numeric: true,
      cell: (r) => (r.ratio === null ? 'n/a' : r.weak ? html`<strong>${num(r.ratio, 2)}</strong> <span class="flag">weakly identified</span>` : num(r.ratio, 2)),
    },
  ];
  const pairs: IntervalPair[] = scalars.map((r) => {
    const inner = b.inner ?? b.outer;
    return {
      label: r.entry.label,
      prior: { lo: priorAt(r.entry, b.outer[0]), lo50: priorAt(r.entry, inner[0]), mid: priorMid(r.entry), hi50: priorAt(r.entry, inner[1]), hi: priorAt(r.entry, b.outer[1]) },
      posterior: { lo: r.posterior.q[b.outer[0]], lo50: r.posterior.q[inner[0]], mid: mid(r.posterior), hi50: r.posterior.q[inner[1]], hi: r.posterior.q[b.outer[1]] },
    };
  });
  const svg = pairs.length === 0 ? null : await ctx.chart(priorPosteriorSpec(pairs));
  const key: KeyEntry[] = [
    { kind: 'band', colour: COLOURS.prior, opacity: 1, label: 'prior' },
    { kind: 'band', colour: COLOURS.estimate, opacity: 1, label: 'posterior' },
  ];
  const stepLine =
    steps.length === 0
      ? ''
      : html`<p>The ${steps.length} standardised walk steps z_k (prior normal(0, 1)) are in summary.csv; ${steps.filter((r) => r.posterior.q[b.outer[0]] > 0 || r.posterior.q[b.outer[1]] < 0).length} of them have a ${b.outerName} interval that excludes 0, i.e. a ${folder.run.priorSet.model.knot_days}-day step in which the data show a clear change in transmission.</p>`;
  return {
    id: 'parameters',
    title: 'Parameters: prior and posterior',
    body: html`${table(`Prior against posterior (${b.outerName} intervals); prior set "${folder.run.priorSet.name}"`, columns, scalars, (r) => (r.weak ? 'weak' : null))}
<p class="footnote"><sup>*</sup> On the sampler's scale (log, or logit for the ascertainment), from run.json. Above ${num(WEAK_RATIO)}: the interval mostly restates the prior, because these data say little about the parameter.</p>
${svg === null ? note('No scalar parameters to draw.') : figure(svg, { key, caption: html`Thin bar: ${b.outerName} interval; thick bar: ${b.innerName ?? b.outerName} interval; white tick: median. Axes are logarithmic where values span more than a factor of 30.` })}${stepLine}`,
  };
}
