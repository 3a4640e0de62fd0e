/**
 * Prior against posterior, one small panel per parameter: each a thin bar over the outer
 * interval, a thick bar over the inner interval and a tick at the median, the prior above the
 * posterior. A posterior much narrower than its prior was learned from the data; one as wide
 * as its prior mostly restates it.
 */
import type { ChartSpec } from '../render.js';
import { CHART_CONFIG, COLOURS, SIZE } from '../theme.js';

export interface IntervalPair {
  /** panel title (the parameter) */
  label: string;
  prior: { lo: number; lo50: number; mid: number; hi50: number; hi: number };
  posterior: { lo: number; lo50: number; mid: number; hi50: number; hi: number };
}

/** A log axis when every value is positive and they span more than a factor of 30. */
function wantsLog(p: IntervalPair): boolean {
  const all = [p.prior.lo, p.prior.hi, p.posterior.lo, p.posterior.hi];
  const lo = Math.min(...all);
  const hi = Math.max(...all);
  return lo > 0 && hi / lo > 30;
}

function panel(p: IntervalPair): Record<string, unknown> {
  const rows = [
    { source: 'prior', ...p.prior },
    { source: 'posterior', ...p.posterior },
  ].filter((r) => [r.lo, r.hi, r.mid].every(Number.isFinite));
  const log = wantsLog(p);
  const x = (field: string) => ({
    field,
    type: 'quantitative',
    title: null,
    scale: log ? { type: 'log' } : { zero: false, nice: true },
    // a log axis gets no grid: vega would draw one at every minor tick
    axis: { tickCount: 5, grid: !log, gridDash: [2, 3], format: log ? '~g' : '~r' },
  });
  const y = { field: 'source', type: 'nominal', title: null, sort: ['prior', 'posterior'], axis: { labelFontSize: 10, ticks: false, domain: false } };
  const colour = { field: 'source', type: 'nominal', scale: { domain: ['prior', 'posterior'], range: [COLOURS.prior, COLOURS.estimate] }, legend: null };
  return {
    title: { text: p.label, fontSize: 12 },
    width: SIZE.half.width - 60,
    height: 44,
    data: { values: rows },
    layer: [
      { mark: { type: 'rule', strokeWidth: 1.6 }, encoding: { x: x('lo'), x2: { field: 'hi' }, y, color: colour } },
      { mark: { type: 'rule', strokeWidth: 6, strokeCap: 'butt' }, encoding: { x: x('lo50'), x2: { field: 'hi50' }, y, color: colour } },
      { mark: { type: 'tick', thickness: 2, size: 14, color: '#ffffff' }, encoding: { x: x('mid'), y } },
    ],
  };
}

/** Panels in two columns. */
export function priorPosteriorSpec(pairs: readonly IntervalPair[]): ChartSpec {
  return {
    description: 'prior and posterior intervals of each parameter',
    config: { ...CHART_CONFIG, concat: { spacing: 28 } },
    columns: 2,
    concat: pairs.map(panel),
  } as unknown as ChartSpec;
}
