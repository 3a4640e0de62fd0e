/**
 * Growth rate r(t) with its zero line, and the doubling or halving time ln 2 / |r| at weekly
 * dates over the last weeks.
 */
import { addDays } from '../../../io/dates.js';
import { fanChartSpec } from '../charts/fan.js';
import { figure, html, num, table, type Column, type Html } from '../html.js';
import type { QuantileRow } from '../run-folder.js';
import type { ReportContext, Section } from '../section.js';
import { bandLevels, fanSeries, quantityRows } from '../series.js';
import { COLOURS } from '../theme.js';
import { fanKey } from './trajectories.js';

export interface DoublingReading {
  kind: 'doubling' | 'halving' | 'unclear';
  /** ln 2 / |r| at the median growth rate (days) */
  mid: number;
  /** interval of the doubling or halving time, days (NaN when unclear) */
  lo: number;
  hi: number;
}

/**
 * Doubling (r > 0) or halving (r < 0) time from quantiles of the growth rate.
 *
 * @remarks T = ln 2 / |r| (common practice; MODEL.md section 5). T is a monotone function of
 * r on each side of zero, so when the interval [rLo, rHi] lies on one side, the interval of T
 * is ln 2 over its ends, in reverse order (the quantiles of a monotone transform are the
 * transformed quantiles). When it contains zero, the data do not say whether the epidemic
 * grows or shrinks, and no interval of T is given.
 */
export function doublingTime(rMid: number, rLo: number, rHi: number): DoublingReading {
  const ln2 = Math.LN2;
  if (rLo > 0) return { kind: 'doubling', mid: ln2 / rMid, lo: ln2 / rHi, hi: ln2 / rLo };
  if (rHi < 0) return { kind: 'halving', mid: ln2 / -rMid, lo: ln2 / -rLo, hi: ln2 / -rHi };
  return { kind: 'unclear', mid: ln2 / Math.abs(rMid), lo: NaN, hi: NaN };
}

export async function growthSection(ctx: ReportContext): Promise<Section> {
  const { summary, run } = ctx.folder;
  const b = bandLevels(summary.levels);
  const points = fanSeries(summary, 'growth_rate');
  const svg = await ctx.chart(
    fanChartSpec({ series: [{ points, colour: COLOURS.estimate }], reference: { value: 0 }, yTitle: 'growth rate r (per day)', description: 'growth rate per day' }),
  );
  const rows = quantityRows(summary, 'growth_rate');
  const byDate = new Map(rows.map((r) => [r.date, r]));
  const last = run.input.lastDate;
  const picked: QuantileRow[] = [];
  for (let w = 0; w < 8; w++) {
    const r = byDate.get(addDays(last, -7 * w));
    if (r !== undefined) picked.push(r);
  }
  const mid = (r: QuantileRow) => (b.mid >= 0 ? r.q[b.mid] : r.mean);
  // growth.csv (a forecast run) has per-draw quantiles of the doubling and halving times;
  // without it they are read off the quantiles of r, which is exact when r keeps one sign
  const growth = ctx.folder.growth;
  const perDraw = growth === null ? null : { doubling: new Map(quantityRows(growth, 'doubling_time').map((r) => [r.date, r])), halving: new Map(quantityRows(growth, 'halving_time').map((r) => [r.date, r])) };
  const gb = growth === null ? b : bandLevels(growth.levels);
  const timeCell = (r: QuantileRow): Html => {
    const d = reading(r);
    if (d.kind === 'unclear') return html`<span class="muted">unclear: the interval of r contains 0</span>`;
    const fromFile = perDraw?.[d.kind].get(r.date);
    if (fromFile !== undefined) {
      const m = gb.mid >= 0 ? fromFile.q[gb.mid] : fromFile.mean;
      return html`${d.kind === 'doubling' ? 'doubles' : 'halves'} in ${num(m)} [${num(fromFile.q[gb.outer[0]])}, ${num(fromFile.q[gb.outer[1]])}]`;
    }
    return html`${d.kind === 'doubling' ? 'doubles' : 'halves'} in ${num(d.mid)} [${num(d.lo)}, ${num(d.hi)}]`;
  };
  const reading = (r: QuantileRow) => doublingTime(mid(r), r.q[b.outer[0]], r.q[b.outer[1]]);
  const columns: Column<QuantileRow>[] = [
    { head: 'date', cell: (r) => r.date },
    { head: `growth rate per day, ${b.midName} [${b.outerName}]`, numeric: true, cell: (r) => `${num(mid(r))} [${num(r.q[b.outer[0]])}, ${num(r.q[b.outer[1]])}]` },
    { head: `doubling or halving time, days, ${b.midName} [${b.outerName}]`, cell: timeCell },
  ];
  const source =
    growth === null
      ? 'read off the quantiles of r (exact while the interval of r lies on one side of 0)'
      : 'from growth.csv, computed draw by draw';
  return {
    id: 'growth',
    title: 'Growth rate and doubling time',
    body: html`${figure(svg, {
      key: fanKey(summary.levels, 'growth rate', [{ kind: 'dash', colour: COLOURS.reference, label: 'zero growth' }]),
      caption: html`r(t) solves R_t = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)) for each draw (Wallinga and Lipsitch 2007, with Erlang stages). Positive: cases grow; negative: they shrink.`,
    })}${table(`Doubling or halving time ln 2 / |r| at weekly dates up to ${last} (${source})`, columns, picked)}`,
  };
}
