/**
 * What each prior set makes of the data: the reproduction number under each set overlaid, the
 * key quantities side by side, and for every parameter the shift of the posterior from the
 * prior and the contraction of its spread (outputs/identification.ts).
 */
import { fanChartSpec, type FanPoint } from '../charts/fan.js';
import type { CompareContext } from '../compare-page.js';
import type { EstimateRecord } from '../compare-folder.js';
import { figure, html, interval, note, num, table, type Column, type KeyEntry } from '../html.js';
import { WEAK_RATIO } from '../../identification.js';
import type { Section } from '../section.js';
import { bandLevels } from '../series.js';
import { BAND_OPACITY, COLOURS, SCENARIO_COLOURS } from '../theme.js';
import { PARAMETER_LABELS } from './parameters.js';

/** The colour of the i-th prior set in every chart of the page. */
export function setColour(i: number): string {
  return SCENARIO_COLOURS[i % SCENARIO_COLOURS.length]!;
}

function points(rows: readonly EstimateRecord[], levels: readonly number[]): FanPoint[] {
  const b = bandLevels(levels);
  return [...rows]
    .sort((a, c) => (a.date < c.date ? -1 : a.date > c.date ? 1 : 0))
    .map((r) => ({ date: r.date, mid: b.mid >= 0 ? r.q[b.mid]! : r.mean, outerLo: r.q[b.outer[0]]!, outerHi: r.q[b.outer[1]]!, innerLo: null, innerHi: null }));
}

export async function compareReproductionSection(ctx: CompareContext): Promise<Section> {
  const { folder } = ctx;
  const b = bandLevels(folder.levels);
  const series = folder.priorSets.map((p, i) => ({
    points: points(folder.estimates.filter((e) => e.priorSet === p.label && e.quantity === 'effective_reproduction' && e.date !== ''), folder.levels),
    colour: setColour(i),
    inner: false,
  }));
  if (series.every((s) => s.points.length === 0)) return { id: 'reproduction', title: 'Reproduction number under each prior set', body: note('estimates.csv has no rows for effective_reproduction.') };
  const svg = await ctx.chart(fanChartSpec({ series, reference: { value: 1 }, yTitle: 'R_t', description: 'effective reproduction number under each prior set' }));
  const key: KeyEntry[] = [
    ...folder.priorSets.map((p, i) => ({ kind: 'line' as const, colour: setColour(i), label: `${p.label}: ${b.midName} and ${b.outerName} interval` })),
    { kind: 'dash', colour: COLOURS.reference, label: 'R = 1' },
  ];
  return {
    id: 'reproduction',
    title: 'Reproduction number under each prior set',
    body: figure(svg, {
      key,
      caption: html`R_t = beta(t) D S(t)/N from the fit on every day under each prior set, its ${b.midName} as a line and its ${b.outerName} credible interval as a band (opacity ${num(BAND_OPACITY.outer, 2)}). Where the bands overlap the data decide; where they part, the prior does.`,
    }),
  };
}

/** Rows of the side-by-side table: a daily quantity on the last day, or a parameter. */
const KEY_ROWS: ReadonlyArray<{ quantity: string; label: string; daily: boolean }> = [
  { quantity: 'effective_reproduction', label: 'R_t on the last day', daily: true },
  { quantity: 'growth_rate', label: 'growth rate per day, last day', daily: true },
  { quantity: 'infections', label: 'new infections, last day', daily: true },
  { quantity: 'expected_reports', label: 'expected reports, last day', daily: true },
  ...Object.entries(PARAMETER_LABELS).map(([quantity, label]) => ({ quantity, label, daily: false })),
];

export async function compareEstimatesSection(ctx: CompareContext): Promise<Section> {
  const { folder } = ctx;
  const b = bandLevels(folder.levels);
  const last = folder.input.lastDate;
  const find = (set: string, quantity: string, daily: boolean) => folder.estimates.find((e) => e.priorSet === set && e.quantity === quantity && e.date === (daily ? last : ''));
  const columns: Column<(typeof KEY_ROWS)[number]>[] = [
    { head: 'quantity', cell: (r) => html`${r.label}<br><code>${r.quantity}</code>` },
    ...folder.priorSets.map((p) => ({
      head: p.label,
      numeric: true,
      cell: (r: (typeof KEY_ROWS)[number]) => {
        const e = find(p.label, r.quantity, r.daily);
        return e === undefined ? 'n/a' : interval(b.mid >= 0 ? e.q[b.mid]! : e.mean, e.q[b.outer[0]]!, e.q[b.outer[1]]!);
      },
    })),
  ];
  const rows = KEY_ROWS.filter((r) => folder.priorSets.some((p) => find(p.label, r.quantity, r.daily) !== undefined));
  const ids = [...new Set(folder.identification.map((i) => i.parameter))];
  const idColumns: Column<string>[] = [
    { head: 'parameter', cell: (p) => html`${(PARAMETER_LABELS as Record<string, string>)[p] ?? p}<br><code>${p}</code>` },
    ...folder.priorSets.map((s) => ({
      head: s.label,
      numeric: true,
      cell: (p: string) => {
        const i = folder.identification.find((x) => x.priorSet === s.label && x.parameter === p);
        if (i === undefined) return 'n/a';
        return html`shift ${num(i.shift, 2)}<br>contraction ${num(i.contraction, 2)}${i.weak ? html` <span class="flag">weakly identified</span>` : ''}`;
      },
    })),
  ];
  return {
    id: 'estimates',
    title: 'Estimates side by side',
    body: html`${table(`Posterior ${b.midName} [${b.outerName} credible interval] under each prior set, from the fit on every day (last day ${last})`, columns, rows)}
${table('What the data taught under each prior set', idColumns, ids)}
<p class="footnote">Shift: how far the posterior mean moved from the prior mean, in prior standard deviations; contraction: 1 - posterior variance / prior variance, near 1 when the data decide and near 0 (or below) when the prior does; both on the sampler's scale (log, or logit for the ascertainment). Weakly identified: posterior sd above ${num(WEAK_RATIO)} of the prior sd, so the interval mostly restates the prior.</p>`,
  };
}
