/**
 * The daily trajectories as fan charts: the effective and basic reproduction numbers (with
 * the R = 1 line), the transmission rate, and the infections with the nowcast window shaded.
 */
import { addDays } from '../../../io/dates.js';
import { fanChartSpec } from '../charts/fan.js';
import { figure, html, note, type Html, type KeyEntry } from '../html.js';
import type { ReportContext, Section } from '../section.js';
import { bandLevels, fanSeries, lastRow, rowInterval } from '../series.js';
import { BAND_OPACITY, COLOURS } from '../theme.js';
import { nowcastBlock } from './nowcast.js';

/** The key of a one-series fan chart. */
export function fanKey(levels: readonly number[], what: string, extra: KeyEntry[] = []): KeyEntry[] {
  const b = bandLevels(levels);
  return [
    { kind: 'line', colour: COLOURS.estimate, label: `${what}, ${b.midName}` },
    ...(b.innerName === null ? [] : [{ kind: 'band' as const, colour: COLOURS.estimate, opacity: BAND_OPACITY.inner + 0.1, label: `${b.innerName} interval` }]),
    { kind: 'band', colour: COLOURS.estimate, opacity: BAND_OPACITY.outer + 0.08, label: `${b.outerName} interval` },
    ...extra,
  ];
}

async function fan(ctx: ReportContext, quantity: string, label: string, options: { reference?: number; shade?: { from: string; to: string }; caption: Html; extraKey?: KeyEntry[]; name?: string }): Promise<Html> {
  const { summary } = ctx.folder;
  const points = fanSeries(summary, quantity);
  if (points.length === 0) return note(`summary.csv has no rows for ${quantity}.`);
  const svg = await ctx.chart(
    fanChartSpec({
      series: [{ points, colour: COLOURS.estimate }],
      yTitle: label,
      description: `${label} per day`,
      ...(options.reference === undefined ? {} : { reference: { value: options.reference } }),
      ...(options.shade === undefined ? {} : { shade: options.shade }),
    }),
  );
  const refKey: KeyEntry[] = options.reference === undefined ? [] : [{ kind: 'dash', colour: COLOURS.reference, label: `${options.reference === 0 ? 'zero' : `R = ${options.reference}`}` }];
  return figure(svg, { key: fanKey(summary.levels, options.name ?? label, [...refKey, ...(options.extraKey ?? [])]), caption: options.caption });
}

export async function reproductionSection(ctx: ReportContext): Promise<Section> {
  const { summary, run } = ctx.folder;
  const last = run.input.lastDate;
  const b = bandLevels(summary.levels);
  const reff = await fan(ctx, 'effective_reproduction', 'R_t', {
    name: 'effective reproduction number R_t',
    reference: 1,
    caption: html`R_t = beta(t) D S(t)/N: the number of people one case infects at the current level of immunity. Above the dashed line the epidemic grows, below it shrinks. On ${last}: ${rowInterval(summary, lastRow(summary, 'effective_reproduction'))} (${b.midName} [${b.outerName} interval]).`,
  });
  const r0 = await fan(ctx, 'basic_reproduction', 'R_0(t)', {
    name: 'basic reproduction number R_0(t)',
    reference: 1,
    caption: html`R_0(t) = beta(t) D: the same without the depletion of susceptible people, which isolates the change in contacts and behaviour. On ${last}: ${rowInterval(summary, lastRow(summary, 'basic_reproduction'))}.`,
  });
  return { id: 'reproduction', title: 'Reproduction number', body: html`${reff}${r0}` };
}

export async function transmissionSection(ctx: ReportContext): Promise<Section> {
  const { summary, run } = ctx.folder;
  const set = run.priorSet.model;
  const body = await fan(ctx, 'transmission_rate', 'beta (per day)', {
    name: 'transmission rate beta',
    caption: html`beta(t) follows a random walk on the log scale with a knot every ${set.knot_days} days (${set.interpolation === 'linear' ? 'linear between knots' : 'constant between knots'}). On ${run.input.lastDate}: ${rowInterval(summary, lastRow(summary, 'transmission_rate'))}.`,
  });
  return { id: 'transmission', title: 'Transmission rate', body };
}

export async function infectionsSection(ctx: ReportContext): Promise<Section> {
  const { summary, run } = ctx.folder;
  const dmax = run.priorSet.model.delay.max_days;
  const last = run.input.lastDate;
  const from = addDays(last, -(Math.min(dmax, run.input.days) - 1));
  const chart = await fan(ctx, 'infections', 'new infections per day', {
    shade: { from, to: last },
    extraKey: [{ kind: 'shade', colour: COLOURS.nowcast, opacity: 0.6, label: `nowcast window: the last ${dmax} days` }],
    caption: html`Infections (S to E) per day. Reports come up to ${dmax} days after onset, so in the shaded window (${from} to ${last}) part of these infections has not been reported yet: the estimate there leans on the model and the prior more than on the data, and its interval is wider. On ${last}: ${rowInterval(summary, lastRow(summary, 'infections'))}.`,
  });
  const nowcast = await nowcastBlock(ctx);
  return { id: 'infections', title: 'Infections and nowcast', body: html`${chart}${nowcast}` };
}
